import { expect, test } from './fixtures';

// The client hides what a role cannot do (the server refuses it anyway; the API tests prove that).

// Each absence is checked only after the screen has visibly rendered its content, so a blank or broken
// page cannot pass for "the control is hidden".
test.describe('as viewer', () => {
  test.use({ signedInAs: 'viewer' });
  test('a viewer reads trials, runs and coupons but gets no control that changes them', async ({ page }) => {
    await page.goto('/trials/1');
    await expect(page.getByRole('heading', { level: 1 })).toContainText('T26-001');
    await expect(page.getByRole('heading', { name: 'Progress per condition' })).toBeVisible();
    await expect(page.getByRole('button', { name: 'Create the planned coupons' })).toHaveCount(0);

    await page.goto('/coupons/1');
    await expect(page.getByRole('heading', { level: 1 })).toContainText(/^Coupon \S+/);
    await expect(page.getByRole('heading', { name: 'Readings by stage' })).toBeVisible();
    await expect(page.getByRole('form', { name: 'Add a weighing' })).toHaveCount(0);

    await page.goto('/reference?tab=lots');
    await expect(page.getByRole('table', { name: /Resin lots/ })).toBeVisible();
    await expect(page.getByRole('button', { name: 'Activate a new lot' })).toHaveCount(0);

    await page.goto('/admin/users');
    await expect(page.getByRole('heading', { name: 'Not for your role' })).toBeVisible();
  });
});

test.describe('as technician', () => {
  test.use({ signedInAs: 'technician' });
  test('a technician records but does not edit the species reference', async ({ page }) => {
    await page.goto('/trials/1');
    await expect(page.getByRole('button', { name: 'Create the planned coupons' })).toBeVisible();
    await page.goto('/coupons/1');
    await expect(page.getByRole('form', { name: 'Add a weighing' })).toBeVisible();
    await page.goto('/reference?tab=lots');
    await expect(page.getByRole('button', { name: 'Activate a new lot' })).toBeVisible();
    await page.goto('/reference');
    await expect(page.getByRole('table', { name: /species/i })).toBeVisible();
    await expect(page.getByRole('button', { name: 'Add a species' })).toHaveCount(0);
  });
});

test.describe('as admin', () => {
  test.use({ signedInAs: 'admin' });
  test('an admin invites a user and reads the invitation in the outbox', async ({ page }) => {
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
    // An empty storage state: a context made inside a test takes the test's options, so it would otherwise
    // carry the admin's stored cookie, and signing the invited person in would end the admin's stored session.
    const other = await page
      .context()
      .browser()!
      .newContext({ storageState: { cookies: [], origins: [] } });
    const invited = await other.newPage();
    await invited.goto(new URL(link!).pathname + new URL(link!).search);
    await invited.getByLabel('Your name').fill('New Bench Hand');
    await invited.getByLabel('Password').fill('a long bench password');
    await invited.getByRole('button', { name: 'Set the password and sign in' }).click();
    await expect(invited.getByRole('navigation', { name: 'Main' })).toBeVisible();
    await expect(invited.getByRole('link', { name: /New Bench Hand · Technician/ })).toBeVisible();
    await other.close();
  });
});
