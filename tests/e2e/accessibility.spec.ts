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
    '/trials/1/coupons',
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

// A phone held at the oven: the screens used there, at 375 px wide. Besides axe (with the target-size
// rule on), the page must not scroll sideways; a table may scroll inside its own box.
for (const path of ['/', '/runs/1', '/coupons/1']) {
  test.describe('as technician on a phone', () => {
    test.use({ signedInAs: 'technician', viewport: { width: 375, height: 740 } });
    test(`${path} at 375 px has no serious violations, 24 px targets and no sideways scroll`, async ({ page }) => {
      const errors: string[] = [];
      page.on('pageerror', (e) => errors.push(e.message));
      await page.goto(path);
      await expect(page.getByRole('heading', { level: 1 })).toBeVisible();
      await expect(page.getByRole('status').filter({ hasText: /^Loading/ })).toHaveCount(0);
      expect(await seriousViolations(page, { targetSize: true })).toEqual([]);
      const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
      expect(overflow, 'the page scrolls sideways at 375 px').toBeLessThanOrEqual(0);
      expect(errors).toEqual([]);
    });
  });
}
