import { expect, test, type Page } from '@playwright/test';

// The client hides what a role cannot do (the server refuses it anyway; the API tests prove that).
async function signIn(page: Page, email: string) {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill('lumenbook-demo');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByRole('navigation', { name: 'Main' })).toBeVisible();
}

test('a viewer reads trials, runs and coupons but gets no control that changes them', async ({ page }) => {
  await signIn(page, 'viewer@demo.test');
  await page.goto('/trials/1');
  await expect(page.getByRole('heading', { level: 1 })).toContainText('T26-001');
  await expect(page.getByRole('button', { name: 'Create the planned coupons' })).toHaveCount(0);

  await page.goto('/coupons/1');
  await expect(page.getByRole('heading', { level: 1 })).toBeVisible();
  await expect(page.getByRole('form', { name: 'Add a weighing' })).toHaveCount(0);

  await page.goto('/reference?tab=lots');
  await expect(page.getByRole('button', { name: 'Activate a new lot' })).toHaveCount(0);

  await page.goto('/admin/users');
  await expect(page.getByRole('heading', { name: 'Not for your role' })).toBeVisible();
});

test('a technician records but does not edit the species reference', async ({ page }) => {
  await signIn(page, 'tech@demo.test');
  await page.goto('/trials/1');
  await expect(page.getByRole('button', { name: 'Create the planned coupons' })).toBeVisible();
  await page.goto('/coupons/1');
  await expect(page.getByRole('form', { name: 'Add a weighing' })).toBeVisible();
  await page.goto('/reference?tab=lots');
  await expect(page.getByRole('button', { name: 'Activate a new lot' })).toBeVisible();
  await page.goto('/reference');
  await expect(page.getByRole('button', { name: 'Add a species' })).toHaveCount(0);
});

test('an admin invites a user and reads the invitation in the outbox', async ({ page }) => {
  await signIn(page, 'admin@demo.test');
  await page.goto('/admin/users');
  const form = page.getByRole('form', { name: 'Invite a user' });
  await form.getByLabel('E-mail').fill('new.bench.hand@demo.test');
  await form.getByLabel('Name').fill('New Bench Hand');
  await form.getByLabel('Role').selectOption('technician');
  await form.getByRole('button', { name: 'Send the invitation' }).click();
  await expect(page.getByRole('status')).toContainText('Invitation sent to new.bench.hand@demo.test');
  await expect(page.getByRole('cell', { name: 'Invited, not yet joined' })).toBeVisible();

  await page.goto('/admin/outbox');
  const mail = page.getByRole('article', { name: 'You are invited to Lumenbook' }).first();
  await expect(mail).toContainText('new.bench.hand@demo.test');
  const link = (await mail.textContent())?.match(/http:\/\/localhost:\d+\/accept-invitation\?token=[\w-]+/)?.[0];
  expect(link).toBeTruthy();

  // The invited person opens the link in a fresh browser context, sets a password and lands signed in.
  const other = await page.context().browser()!.newContext();
  const invited = await other.newPage();
  await invited.goto(new URL(link!).pathname + new URL(link!).search);
  await invited.getByLabel('Your name').fill('New Bench Hand');
  await invited.getByLabel('Password').fill('a long bench password');
  await invited.getByRole('button', { name: 'Set the password and sign in' }).click();
  await expect(invited.getByRole('navigation', { name: 'Main' })).toBeVisible();
  await expect(invited.getByRole('link', { name: /New Bench Hand · Technician/ })).toBeVisible();
  await other.close();
});
