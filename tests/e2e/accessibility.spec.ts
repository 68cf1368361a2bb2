import { expect, seriousViolations, test, type DemoRole } from './fixtures';

// One test per screen, each as the role that sees the most of it, so a slow machine times out nothing but
// one screen and the report names it. Nothing is excluded from the scan.
const SCREENS: { role: DemoRole; path: string }[] = [
  ...[
    '/',
    '/runs',
    '/runs/1',
    '/runs/new',
    '/coupons',
    '/coupons/1',
    '/reference',
    '/reference?tab=resins',
    '/reference?tab=lots',
    '/trials/new',
    '/preferences',
  ].map((path) => ({ role: 'technician' as const, path })),
  ...['/admin/users', '/admin/outbox', '/admin/settings'].map((path) => ({ role: 'admin' as const, path })),
  ...['/', '/runs/3', '/trials/1', '/imports', '/compare', '/findings', '/wiki', '/no-such-page'].map((path) => ({ role: 'viewer' as const, path })),
];

for (const { role, path } of SCREENS) {
  test.describe(`as ${role}`, () => {
    test.use({ signedInAs: role });
    test(`${path} has no serious or critical accessibility violations`, async ({ page }) => {
      const errors: string[] = [];
      page.on('pageerror', (e) => errors.push(e.message));
      await page.goto(path);
      await expect(page.getByRole('heading', { level: 1 })).toBeVisible();
      // Let queries settle so the scan sees the finished screen, not a loading state.
      await expect(page.getByRole('status').filter({ hasText: /^Loading/ })).toHaveCount(0);
      expect(await seriousViolations(page)).toEqual([]);
      expect(errors).toEqual([]);
    });
  });
}
