import type { APIRequestContext, Page } from '@playwright/test';
import { expect, seriousViolations, test } from './fixtures';

test.use({ signedInAs: 'technician' });

// What the browser's fetch wrapper sends with every write (CSRF defence beside the SameSite cookie).
const WRITE_HEADERS = { 'x-lumenbook-csrf': '1' };

/** Three fresh treated coupons in a new run, so the grid starts empty whatever else the demo holds. */
async function freshRun(request: APIRequestContext): Promise<{ runId: number; tags: string[] }> {
  const species = await request.get('/api/species?pageSize=5');
  expect(species.ok()).toBeTruthy();
  const speciesId: number = (await species.json()).items[0].id;
  const stamp = Date.now().toString(36).toUpperCase();
  const tags = [1, 2, 3].map((n) => `E2E-${stamp}-${n}`);
  const couponIds: number[] = [];
  for (const tag of tags) {
    const res = await request.post('/api/coupons', { headers: WRITE_HEADERS, data: { tag, speciesId, role: 'treated' } });
    expect(res.status(), await res.text()).toBe(201);
    couponIds.push((await res.json()).coupon.id);
  }
  const run = await request.post('/api/runs', { headers: WRITE_HEADERS, data: { chamber: 'Browser-test pot', couponIds } });
  expect(run.status(), await run.text()).toBe(201);
  return { runId: (await run.json()).run.id, tags };
}

const rowOf = (page: Page, tag: string) => page.getByRole('row').filter({ has: page.getByRole('rowheader', { name: tag }) });
const cellOf = (page: Page, label: string, tag: string) => page.getByRole('textbox', { name: new RegExp(`^${label} \\(\\w+\\), coupon ${tag}`) });

// Typed in the grid, in grams and millimetres (the technician's metric display).
const DRY = ['20.48', '18.9', '22.35'];
const CURED = ['31.07', '29.62', '33.8'];
const SIZE = ['120.2', '25.1', '20.3'];

test('a technician types weights and sizes with the keyboard only, sees WPG and resin loading, saves and finds them after a reload', async ({ page }) => {
  const { runId, tags } = await freshRun(page.request);
  const [t1, t2, t3] = tags as [string, string, string];

  await page.goto(`/runs/${runId}/coupons`);
  const grid = page.getByRole('grid');
  await expect(grid).toBeVisible();
  await expect(grid).toHaveAttribute('aria-rowcount', String(3 + 2));

  // Focus the first cell once; from here on only the keyboard moves.
  await cellOf(page, 'Dry mass', t1).focus();
  const k = page.keyboard;
  // Down the dry-mass column with Enter.
  await k.type(DRY[0]!);
  await k.press('Enter');
  await k.type(DRY[1]!);
  await k.press('Enter');
  await k.type(DRY[2]!);
  // Back up to the first row with the arrow keys, then across it with Tab.
  await k.press('ArrowUp');
  await k.press('ArrowUp');
  await expect(cellOf(page, 'Dry mass', t1)).toBeFocused();
  for (const v of SIZE) {
    await k.press('Tab');
    await k.type(v);
  }
  await k.press('Tab'); // the soaked mass, not weighed in this test
  await k.press('Tab');
  await expect(cellOf(page, 'Cured mass', t1)).toBeFocused();
  // Down the cured-mass column with Enter.
  await k.type(CURED[0]!);
  await k.press('Enter');
  await k.type(CURED[1]!);
  await k.press('Enter');
  await k.type(CURED[2]!);

  // The computed columns follow the typing. WPG = (cured − dry) / dry × 100; resin loading =
  // (cured − dry) / dry volume, g/cm³ × 1000 = kg/m³, volume = length × width × thickness.
  const wpg = (i: number) => (((Number(CURED[i]) - Number(DRY[i])) / Number(DRY[i])) * 100).toFixed(1);
  const volumeCm3 = (Number(SIZE[0]) * Number(SIZE[1]) * Number(SIZE[2])) / 1000;
  const loading = (((Number(CURED[0]) - Number(DRY[0])) / volumeCm3) * 1000).toFixed(0);
  for (const [i, tag] of tags.entries()) await expect(rowOf(page, tag).locator('[data-col=wpg]')).toHaveText(wpg(i));
  await expect(rowOf(page, t1).locator('[data-col=loading]')).toHaveText(loading);
  await expect(rowOf(page, t2).locator('[data-col=loading]')).toHaveText('—');

  await k.press('Control+s');
  await expect(page.getByRole('status').filter({ hasText: 'Saved' })).toContainText('Saved 6 weighings and 1 size set for 3 coupons');

  await page.reload();
  await expect(cellOf(page, 'Dry mass', t1)).toHaveValue(DRY[0]!);
  await expect(cellOf(page, 'Cured mass', t3)).toHaveValue(CURED[2]!);
  await expect(cellOf(page, 'Dry thickness', t1)).toHaveValue(SIZE[2]!);
  // A saved value is corrected on the coupon page with a reason, not overtyped in the grid.
  await expect(cellOf(page, 'Cured mass', t2)).toHaveAttribute('readonly', '');
  await expect(rowOf(page, t2).locator('[data-col=wpg]')).toHaveText(wpg(1));
  await expect(rowOf(page, t1).locator('[data-col=loading]')).toHaveText(loading);
});

test('a cured mass below the dry mass is refused in the row with its reason and not saved', async ({ page }) => {
  const { runId, tags } = await freshRun(page.request);
  const [t1] = tags as [string];
  await page.goto(`/runs/${runId}/coupons`);
  await cellOf(page, 'Dry mass', t1).focus();
  await page.keyboard.type('20');
  for (let i = 0; i < 5; i++) await page.keyboard.press('Tab');
  await page.keyboard.type('18');
  await expect(cellOf(page, 'Cured mass', t1)).toHaveAttribute('aria-invalid', 'true');
  await expect(rowOf(page, t1).locator('[data-col=check]')).toContainText('cannot be below the dry mass');
  await page.keyboard.press('Control+s');
  await expect(page.getByRole('status').filter({ hasText: 'Nothing saved' })).toContainText('1 row has problems');
  await page.reload();
  // Nothing was saved: the server holds no weighing; the grid shows the typed values again only as this browser's draft.
  const saved = await page.request.get(`/api/coupons/full?runId=${runId}`);
  const first = (await saved.json()).items.find((c: { tag: string }) => c.tag === t1);
  expect(first.weighings).toEqual([]);
  await expect(page.getByText(/Restored values typed here/)).toBeVisible();
});

test('the entry grid page has no serious or critical accessibility violations', async ({ page }) => {
  const { runId, tags } = await freshRun(page.request);
  await page.goto(`/runs/${runId}/coupons`);
  await cellOf(page, 'Dry mass', tags[0]!).focus();
  await page.keyboard.type('21.5');
  await expect(page.getByRole('grid')).toBeVisible();
  expect(await seriousViolations(page)).toEqual([]);
});
