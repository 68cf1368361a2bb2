import type { APIRequestContext, Page } from '@playwright/test';
import { expect, test } from './fixtures';

test.use({ signedInAs: 'technician', viewport: { width: 1280, height: 800 } });

// What the browser's fetch wrapper sends with every write (CSRF defence beside the SameSite cookie).
const WRITE_HEADERS = { 'x-lumenbook-csrf': '1' };

/** An invented trial with `perCondition` treated coupons in each of two conditions (two soak lengths), no controls. */
async function trialWithCoupons(request: APIRequestContext, perCondition: number) {
  const species = await request.get('/api/species?pageSize=5');
  const resins = await request.get('/api/resins?pageSize=5');
  const speciesId: number = (await species.json()).items[0].id;
  const resinId: number = (await resins.json()).items[0].id;
  const stamp = Date.now().toString(36).toUpperCase();
  const trial = await request.post('/api/trials', {
    headers: WRITE_HEADERS,
    data: {
      title: `Grid journey ${stamp}`,
      question: 'Does a longer soak take up more resin?',
      controlsPerSpecies: 0,
      conditions: [
        { speciesId, resinId, processLabel: `Short soak ${stamp}`, couponsWanted: perCondition },
        { speciesId, resinId, processLabel: `Long soak ${stamp}`, couponsWanted: perCondition },
      ],
    },
  });
  expect(trial.status(), await trial.text()).toBe(201);
  const trialId: number = (await trial.json()).trial.id;
  const made = await request.post(`/api/trials/${trialId}/coupons`, { headers: WRITE_HEADERS });
  expect(made.ok(), await made.text()).toBeTruthy();
  const coupons: { id: number; tag: string; conditionId: number }[] = (await made.json()).coupons;
  return { trialId, stamp, coupons: [...coupons].sort((a, b) => (a.tag < b.tag ? -1 : a.tag > b.tag ? 1 : 0)) };
}

const focusedLabel = (page: Page) => page.evaluate(() => document.activeElement?.getAttribute('aria-label') ?? '');

test('a long grid: only the rows in view are in the page, the keyboard reaches the last coupon and back, and focus survives scrolling away', async ({
  page,
}) => {
  const { trialId, coupons } = await trialWithCoupons(page.request, 100);
  const first = coupons[0]!;
  const last = coupons[coupons.length - 1]!;
  await page.goto(`/trials/${trialId}/coupons`);
  const grid = page.getByRole('grid');
  await expect(grid).toHaveAttribute('aria-rowcount', String(200 + 2));
  await expect(page.getByRole('rowheader', { name: first.tag })).toBeVisible();
  // Virtualized: far fewer rows than coupons are rendered.
  expect(await grid.locator('tbody tr[aria-rowindex]').count()).toBeLessThan(80);

  await page.getByRole('textbox', { name: new RegExp(`^Dry mass \\(\\w+\\), coupon ${first.tag}`) }).focus();
  await page.keyboard.press('Control+End');
  await expect.poll(() => focusedLabel(page)).toMatch(new RegExp(`^Cured thickness .*coupon ${last.tag}`));
  await expect(page.getByRole('rowheader', { name: last.tag })).toBeInViewport();
  const lastRow = page.getByRole('row').filter({ has: page.getByRole('rowheader', { name: last.tag }) });
  await expect(lastRow).toHaveAttribute('aria-rowindex', String(200 + 2));

  // Scrolled back to the top with the wheel: the focused row stays in the page, so the keyboard carries on from it.
  await grid.hover();
  for (let i = 0; i < 30; i++) await page.mouse.wheel(0, -4000);
  await expect(page.getByRole('rowheader', { name: first.tag })).toBeInViewport();
  await expect.poll(() => focusedLabel(page)).toMatch(new RegExp(`coupon ${last.tag}`));
  await page.keyboard.press('ArrowUp');
  await expect.poll(() => focusedLabel(page)).toMatch(new RegExp(`^Cured thickness .*coupon ${coupons[coupons.length - 2]!.tag}`));
  await expect(page.getByRole('rowheader', { name: coupons[coupons.length - 2]!.tag })).toBeInViewport();

  await page.keyboard.press('Control+Home');
  await expect.poll(() => focusedLabel(page)).toMatch(new RegExp(`^Dry mass .*coupon ${first.tag}`));
  await page.keyboard.press('PageDown');
  await expect.poll(() => focusedLabel(page)).not.toMatch(new RegExp(`coupon ${first.tag}`));

  // A link from the bench to one coupon's cell lands on it, far down the grid.
  await page.goto(`/trials/${trialId}/coupons?focus=${last.id}&col=cured`);
  await expect.poll(() => focusedLabel(page)).toMatch(new RegExp(`^Cured mass .*coupon ${last.tag}`));
  await expect(page.getByRole('rowheader', { name: last.tag })).toBeInViewport();
});

test('at 1280 px the tag and the computed columns stay in view across the grid, and each coupon shows its condition', async ({ page }) => {
  const { trialId, stamp, coupons } = await trialWithCoupons(page.request, 2);
  await page.goto(`/trials/${trialId}/coupons`);
  await expect(page.getByRole('grid')).toBeVisible();
  // The key above the grid names each condition; the cell carries its short code.
  const key = page.getByRole('definition').filter({ hasText: `Short soak ${stamp}` });
  await expect(key).toBeVisible();
  const firstRow = page.getByRole('row').filter({ has: page.getByRole('rowheader', { name: coupons[0]!.tag }) });
  await expect(firstRow.locator('[data-col=condition]')).toContainText(/C[12]/);
  await expect(page.getByRole('columnheader', { name: /MC.*% of dry mass/ })).toBeVisible();

  // Across to the last entry column: the tag and WPG stay on screen.
  await page.getByRole('textbox', { name: new RegExp(`^Dry mass \\(\\w+\\), coupon ${coupons[0]!.tag}`) }).focus();
  await page.keyboard.press('End');
  await expect.poll(() => focusedLabel(page)).toMatch(/^Cured thickness/);
  await expect(page.getByRole('rowheader', { name: coupons[0]!.tag })).toBeInViewport();
  await expect(firstRow.locator('[data-col=wpg]')).toBeInViewport();
  await expect(page.getByRole('columnheader', { name: 'WPG (%)' })).toBeInViewport();
});

test('a cured weight typed while the run is still drying is flagged on its row, and can still be saved deliberately', async ({ page }) => {
  const { coupons } = await trialWithCoupons(page.request, 1);
  const coupon = coupons[0]!;
  const run = await page.request.post('/api/runs', { headers: WRITE_HEADERS, data: { chamber: 'Grid journey pot', couponIds: [coupon.id] } });
  expect(run.status(), await run.text()).toBe(201);
  const runId: number = (await run.json()).run.id;
  const drying = await page.request.post(`/api/runs/${runId}/stages`, {
    headers: WRITE_HEADERS,
    data: { stage: 'drying', startedAt: new Date(Date.now() - 3_600_000).toISOString() },
  });
  expect(drying.ok(), await drying.text()).toBeTruthy();

  await page.goto(`/runs/${runId}/coupons`);
  const row = page.getByRole('row').filter({ has: page.getByRole('rowheader', { name: coupon.tag }) });
  await page.getByRole('textbox', { name: new RegExp(`^Dry mass \\(\\w+\\), coupon ${coupon.tag}`) }).fill('20.5');
  await expect(row.locator('[data-col=check]')).not.toContainText('Warning');
  await page.getByRole('textbox', { name: new RegExp(`^Cured mass \\(\\w+\\), coupon ${coupon.tag}`) }).fill('26.1');
  const check = row.locator('[data-col=check]');
  await expect(check).toContainText('is still at its drying stage');
  await expect(check).toContainText('It can still be saved.');
  // Also above the grid, where it shows whatever part of the grid is scrolled into view.
  const above = page.getByText('Check before saving (saving is still allowed):').locator('..');
  await expect(above).toContainText(`1 cured weight (${coupon.tag}): run`);
  await above.getByRole('button', { name: `Go to ${coupon.tag}` }).click();
  await expect.poll(() => focusedLabel(page)).toMatch(new RegExp(`^Cured mass .*coupon ${coupon.tag}`));
  await page.keyboard.press('Control+s');
  await expect(page.getByRole('status').filter({ hasText: 'Saved' })).toContainText('Saved 2 weighings');
});
