import fs from 'node:fs';
import AxeBuilder from '@axe-core/playwright';
import { expect, test, type Page } from '@playwright/test';

// The demo's main trial, whose finished runs give the Compare screen its points.
const DEMO_TRIAL = 'T26-001';

async function signIn(page: Page, email: string) {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill('lumenbook-demo');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByRole('navigation', { name: 'Main' })).toBeVisible();
}

async function openCompareFromTrial(page: Page) {
  await page.goto('/trials');
  await page
    .getByRole('link', { name: new RegExp(DEMO_TRIAL) })
    .first()
    .click();
  await page.getByRole('link', { name: 'Results in Compare' }).click();
  await expect(page).toHaveURL(/\/compare\?trialId=\d+/);
  await expect(page.getByTestId('plot-wpg-sg').locator('svg[role="img"]')).toBeVisible({ timeout: 20_000 });
}

test('compare: from a trial to the plot, the fit in words, handbook SG, SVG download, two resins, a saved view', async ({ page }) => {
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(e.message));
  await signIn(page, 'tech@demo.test');
  await openCompareFromTrial(page);
  const compareUrl = page.url();

  // One point per included coupon.
  const status = await page.getByText(/coupons match:/).textContent();
  const included = Number(/(\d+) treated coupons in the uptake analysis/.exec(status ?? '')?.[1]);
  expect(included).toBeGreaterThan(3);
  const figure = page.getByTestId('plot-wpg-sg');
  await expect(figure.locator('svg[role="img"] g.coupon-points > *')).toHaveCount(included);
  await expect(figure.locator('figcaption')).toContainText(/WPG (falls|rises) by about [\d.]+ points for each 0\.1 rise in oven-dry SG/);
  await expect(figure.locator('figcaption')).toContainText(`${included} coupons shown`);

  // Toggle the species' handbook SG.
  await page.getByLabel("the species' handbook SG").click();
  await expect(page).toHaveURL(/sgBasis=handbook/);
  await expect(page.getByRole('heading', { name: 'WPG against handbook oven-dry SG' })).toBeVisible();
  await page.getByLabel("each coupon's measured SG").click();
  await expect(page.getByRole('heading', { name: 'WPG against measured oven-dry SG' })).toBeVisible();

  // Download the plot as SVG.
  const [download] = await Promise.all([page.waitForEvent('download'), figure.getByRole('button', { name: /Download SVG/ }).click()]);
  expect(download.suggestedFilename()).toBe('wpg-vs-sg.svg');
  const file = await download.path();
  const svg = fs.readFileSync(file, 'utf8');
  expect(svg.startsWith('<svg')).toBe(true);
  expect(svg).toContain('coupon-points');

  // Compare two resins on one species.
  const two = page.getByRole('region', { name: 'Compare two groups' });
  await two.getByRole('button', { name: 'Compare' }).click();
  const result = page.getByTestId('compare-result');
  await expect(result).toContainText(/averaged [\d.]+ % WPG (more|less) than/);
  await expect(result).toContainText(/from \d+ coupons/);
  await expect(result).toContainText("Hedges' g is the difference in means divided by the pooled standard deviation");

  // Save the view as evidence and open it.
  const save = page.getByRole('region', { name: 'Save this view as evidence' });
  await save.getByLabel('Title').fill('Clear against dyed in the demo trial');
  await save.getByRole('button', { name: 'Save view' }).click();
  await expect(save.getByRole('status')).toContainText(/Saved as view no\. \d+/);
  await save.getByRole('link', { name: 'Open the saved view' }).click();
  await expect(page.getByRole('heading', { level: 1 })).toContainText('Clear against dyed in the demo trial');
  await expect(page.getByText('The same view computed now gives the same numbers.')).toBeVisible();
  await expect(page.getByTestId('compare-result')).toContainText(/averaged/);

  // A click on a point opens its coupon.
  await page.goto(compareUrl);
  await expect(figure.locator('svg[role="img"]')).toBeVisible({ timeout: 20_000 });
  const first = figure.locator('svg[role="img"] g.coupon-points > *').first();
  // Plot's pointer picks the point nearest the mouse: hovering names the coupon, a click opens it.
  await figure.scrollIntoViewIfNeeded();
  const box = (await first.boundingBox())!;
  await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
  await expect(figure.locator('svg[role="img"]')).toContainText(/ — .+, .+/);
  await page.mouse.click(box.x + box.width / 2, box.y + box.height / 2);
  await expect(page).toHaveURL(/\/coupons\/\d+$/);

  expect(errors).toEqual([]);
});

test('the Compare screen has no serious or critical accessibility violations', async ({ page }) => {
  await signIn(page, 'viewer@demo.test');
  await openCompareFromTrial(page);
  await page.waitForLoadState('networkidle');
  const results = await new AxeBuilder({ page }).analyze();
  const bad = results.violations
    .filter((v) => v.impact === 'serious' || v.impact === 'critical')
    .map((v) => `${v.id}: ${v.help} (${v.nodes.map((n) => n.target.join(' ')).join(', ')})`);
  expect(bad).toEqual([]);
});
