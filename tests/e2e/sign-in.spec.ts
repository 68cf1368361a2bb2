import { expect, seriousViolations, signIn, test } from './fixtures';

// What each demo role should and should not see in the main navigation.
const ROLES = [
  { email: 'admin@demo.test', sees: ['Bench', 'Trials', 'Imports', 'Users', 'Outbox', 'Settings'], hidden: [] },
  { email: 'reviewer@demo.test', sees: ['Bench', 'Trials', 'Imports', 'Findings', 'Wiki'], hidden: ['Users', 'Outbox', 'Settings'] },
  { email: 'tech@demo.test', sees: ['Bench', 'Runs', 'Coupons', 'Imports'], hidden: ['Users', 'Outbox', 'Settings'] },
  { email: 'viewer@demo.test', sees: ['Bench', 'Trials', 'Imports', 'Compare', 'Wiki'], hidden: ['Users', 'Outbox', 'Settings'] },
];

for (const role of ROLES) {
  test(`${role.email} signs in and sees the navigation of that role`, async ({ page }) => {
    await signIn(page, role.email);
    const nav = page.getByRole('navigation', { name: 'Main' });
    for (const label of role.sees) await expect(nav.getByRole('link', { name: label, exact: true })).toBeVisible();
    for (const label of role.hidden) await expect(nav.getByRole('link', { name: label, exact: true })).toHaveCount(0);
    await page.getByRole('button', { name: 'Sign out' }).click();
    await expect(page.getByRole('heading', { name: 'Sign in' })).toBeVisible();
  });
}

test('a wrong password shows the error on the form', async ({ page }) => {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill('tech@demo.test');
  await page.getByLabel('Password').fill('not the password');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByRole('alert')).toContainText('E-mail or password is not right');
});

test('the sign-in page has no serious or critical accessibility violations', async ({ page }) => {
  await page.goto('/sign-in');
  await expect(page.getByRole('heading', { name: 'Sign in' })).toBeVisible();
  expect(await seriousViolations(page)).toEqual([]);
});
