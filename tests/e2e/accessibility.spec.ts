import AxeBuilder from '@axe-core/playwright';
import { expect, test, type Page } from '@playwright/test';

// Every main screen, scanned as the role that sees the most of it; nothing is excluded.
async function signIn(page: Page, email: string) {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill('lumenbook-demo');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByRole('navigation', { name: 'Main' })).toBeVisible();
}

async function expectNoSeriousViolations(page: Page, path: string) {
  await page.goto(path);
  await expect(page.getByRole('heading', { level: 1 })).toBeVisible();
  // Let queries settle so the scan sees the finished screen, not a loading state.
  await page.waitForLoadState('networkidle');
  const results = await new AxeBuilder({ page }).analyze();
  const bad = results.violations
    .filter((v) => v.impact === 'serious' || v.impact === 'critical')
    .map((v) => `${path} ${v.id}: ${v.help} (${v.nodes.map((n) => n.target.join(' ')).join(', ')})`);
  expect(bad).toEqual([]);
}

const SCREENS: { email: string; paths: string[] }[] = [
  {
    email: 'tech@demo.test',
    paths: ['/', '/runs', '/runs/1', '/runs/new', '/coupons', '/coupons/1', '/reference', '/reference?tab=resins', '/reference?tab=lots', '/trials/new', '/preferences'],
  },
  { email: 'admin@demo.test', paths: ['/admin/users', '/admin/outbox', '/admin/settings'] },
  { email: 'viewer@demo.test', paths: ['/', '/runs/3', '/trials/1', '/imports'] },
];

for (const { email, paths } of SCREENS) {
  test(`main screens as ${email} have no serious or critical accessibility violations`, async ({ page }) => {
    // Eleven screens in one test: give it room on a busy machine (no timing is asserted).
    test.slow();
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));
    await signIn(page, email);
    for (const path of paths) await expectNoSeriousViolations(page, path);
    expect(errors).toEqual([]);
  });
}
