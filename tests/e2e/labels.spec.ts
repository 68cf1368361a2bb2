import { expect, seriousViolations, test } from './fixtures';

test.use({ signedInAs: 'technician' });

// The demo's main trial, whose coupons the demo data creates.
const DEMO_TRIAL = 'T26-001';

test('a technician opens the demo trial and its label sheet shows one QR code per coupon', async ({ page }) => {
  await page.goto('/');
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Trials', exact: true }).click();
  await page.getByRole('link', { name: DEMO_TRIAL, exact: true }).click();
  await expect(page.getByRole('heading', { level: 1 })).toContainText(DEMO_TRIAL);

  const id = Number(new URL(page.url()).pathname.split('/').pop());
  // The same session the page uses; the count is what the API says, not a number written here.
  const res = await page.request.get(`/api/trials/${id}`);
  expect(res.ok()).toBe(true);
  const { trial } = (await res.json()) as { trial: { couponCount: number } };
  expect(trial.couponCount).toBeGreaterThan(0);

  await page.getByRole('link', { name: 'Label sheet' }).click();
  await expect(page.getByRole('heading', { level: 1 })).toHaveText(`Labels · ${DEMO_TRIAL}`);
  const labels = page.getByRole('list', { name: 'Coupon labels' });
  const qrImages = labels.getByRole('img');
  await expect(qrImages).toHaveCount(trial.couponCount);
  await expect(labels.getByRole('listitem')).toHaveCount(trial.couponCount);

  // Each QR code is the server's SVG as an image, named by the coupon's tag printed beside it.
  const first = qrImages.first();
  await expect(first).toHaveAttribute('src', /^data:image\/svg\+xml/);
  const tag = await first.getAttribute('alt');
  expect(tag).toMatch(new RegExp(`^${DEMO_TRIAL}-`));
  await expect(labels.getByText(tag!, { exact: true })).toBeVisible();
  // Loaded and drawn, not a broken image.
  expect(await first.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth > 0)).toBe(true);
  await expect(page.getByRole('button', { name: 'Print' })).toBeEnabled();
});

test('the trials list and the trial page have no serious or critical accessibility violations', async ({ page }) => {
  await page.goto('/trials');
  await expect(page.getByRole('link', { name: DEMO_TRIAL, exact: true })).toBeVisible();
  // Wait for the per-trial progress to arrive so the scan sees the finished table.
  await expect(page.getByText(/done \(\d+ %\)/).first()).toBeVisible();
  expect(await seriousViolations(page)).toEqual([]);

  await page.getByRole('link', { name: DEMO_TRIAL, exact: true }).click();
  await expect(page.getByRole('heading', { name: 'Progress per condition' })).toBeVisible();
  expect(await seriousViolations(page)).toEqual([]);
});
