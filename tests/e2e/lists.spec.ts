import type { Locator } from '@playwright/test';
import { expect, test } from './fixtures';

test.use({ signedInAs: 'technician' });

/** The numbers of one column of a table, blanks ("—") left out. */
async function columnNumbers(table: Locator, index: number): Promise<number[]> {
  const cells = await table
    .locator('tbody tr')
    .locator(`:nth-child(${index + 1})`)
    .allInnerTexts();
  return cells
    .map((t) => t.trim())
    .filter((t) => t !== '—' && t !== '')
    .map(Number);
}

test('the coupon list walks forward by the cursor of each page and back by number', async ({ page }) => {
  // 55 coupons of our own, so their search shows two pages of 50 whatever else the demo holds.
  const species = await (await page.request.get('/api/species/options?limit=1')).json();
  for (let i = 1; i <= 55; i++) {
    const made = await page.request.post('/api/coupons', {
      headers: { 'x-lumenbook-csrf': '1' },
      data: { tag: `PGW-${String(i).padStart(3, '0')}`, speciesId: species.items[0].id, role: 'control' },
    });
    expect([201, 409]).toContain(made.status());
  }
  await page.goto('/coupons?q=PGW-');
  await expect(page.getByRole('heading', { level: 1, name: 'Coupons' })).toBeVisible();
  const table = page.getByRole('table', { name: 'Coupons matching the filters' });
  const pager = page.getByRole('navigation', { name: 'Pages of coupons' });
  await expect(pager).toBeVisible();
  await expect(table).not.toHaveAttribute('aria-busy', 'true');
  const first = await table.locator('tbody th').allInnerTexts();
  const byCursor = page.waitForRequest((r) => r.url().includes('/api/coupons?') && r.url().includes('after='));
  await pager.getByRole('button', { name: 'Next page' }).click();
  await byCursor;
  await expect(pager.getByRole('status')).toHaveText(/^Page 2 of/);
  await expect.poll(async () => (await table.locator('tbody th').allInnerTexts()).some((t) => first.includes(t))).toBe(false);
  await pager.getByRole('button', { name: 'Previous page' }).click();
  await expect(pager.getByRole('status')).toHaveText(/^Page 1 of/);
  await expect.poll(() => table.locator('tbody th').allInnerTexts()).toEqual(first);
});

test('the coupon list sorts, searches, filters and exports what it shows, and a typed tag opens its coupon', async ({ page }) => {
  await page.goto('/coupons');
  await expect(page.getByRole('heading', { level: 1, name: 'Coupons' })).toBeVisible();
  const table = page.getByRole('table', { name: 'Coupons matching the filters' });
  await expect(table).toBeVisible();

  // Sort by a column: the header says which way, the address keeps it.
  const headers = await table.locator('thead th').allInnerTexts();
  const sgColumn = headers.findIndex((h) => h.startsWith('Dry SG'));
  await table.getByRole('button', { name: /^Dry SG/ }).click();
  await expect(page).toHaveURL(/sort=drySg/);
  await expect(table.locator('thead th').nth(sgColumn)).toHaveAttribute('aria-sort', 'ascending');
  // The previous page stays on screen, marked busy, until the sorted one arrives.
  await expect(table).not.toHaveAttribute('aria-busy', 'true');
  const up = await columnNumbers(table, sgColumn);
  expect(up.length).toBeGreaterThan(1);
  expect(up).toEqual([...up].sort((a, b) => a - b));
  await table.getByRole('button', { name: /^Dry SG/ }).click();
  await expect(page).toHaveURL(/sort=-drySg/);
  await expect(table.locator('thead th').nth(sgColumn)).toHaveAttribute('aria-sort', 'descending');
  await expect.poll(() => columnNumbers(table, sgColumn)).toEqual([...up].sort((a, b) => b - a).slice(0, up.length));

  // Search by tag and filter by what the coupon still waits for; every row answers both.
  const filters = page.getByRole('search', { name: 'Filter the coupons' });
  await filters.getByLabel('Search by tag').fill('t26-001');
  await expect(page).toHaveURL(/q=t26-001/);
  await filters.getByLabel('Waiting for').selectOption('cured-weighing');
  await expect(page).toHaveURL(/waitingFor=cured-weighing/);
  await expect(page.getByRole('status').filter({ hasText: /coupons? in all|Page 1 of/ })).toBeVisible();
  await expect(table).not.toHaveAttribute('aria-busy', 'true');
  const tags = await table.locator('tbody th').allInnerTexts();
  expect(tags.length).toBeGreaterThan(0);
  for (const tag of tags) expect(tag.toUpperCase()).toContain('T26-001');
  const shown = await page
    .getByRole('status')
    .filter({ hasText: /coupons? in all|Page 1 of/ })
    .innerText();
  const total = Number(/(\d+) coupons?\)?( in all)?\.?$/.exec(shown.trim())?.[1]);
  expect(total).toBeGreaterThan(0);

  // The address reproduces the view.
  await page.reload();
  await expect(filters.getByLabel('Waiting for')).toHaveValue('cured-weighing');
  await expect(filters.getByLabel('Search by tag')).toHaveValue('t26-001');
  await expect(table.getByRole('columnheader', { name: /Dry SG/ })).toHaveAttribute('aria-sort', 'descending');

  // The export carries the same filters and every matching coupon, not just the page.
  const exportLink = page.getByRole('link', { name: /Export CSV/ });
  const href = (await exportLink.getAttribute('href'))!;
  expect(href).toMatch(/^\/api\/coupons\/export\.csv\?/);
  expect(href).toContain('waitingFor=cured-weighing');
  expect(href).toContain('q=t26-001');
  const csv = await page.request.get(href);
  expect(csv.status()).toBe(200);
  expect(csv.headers()['content-type']).toContain('text/csv');
  const lines = (await csv.text()).trim().split(/\r?\n/);
  expect(lines.length - 1).toBe(total);

  // "Scan or type a tag": Enter opens the coupon.
  const tag = tags[0]!.trim();
  const scan = page.getByLabel('Scan or type a tag');
  await scan.fill(tag.toLowerCase());
  await scan.press('Enter');
  await expect(page.getByRole('heading', { level: 1 })).toHaveText(`Coupon ${tag}`);
});

test('runs and trials filter by status and sort by a column, kept in the address', async ({ page }) => {
  await page.goto('/runs');
  await expect(page.getByRole('heading', { level: 1, name: 'Runs' })).toBeVisible();
  await page.getByRole('search', { name: 'Filter the runs' }).getByLabel('Status').selectOption('finished');
  await expect(page).toHaveURL(/status=finished/);
  const runs = page.getByRole('table', { name: 'Runs matching the filters' });
  await runs.getByRole('button', { name: /^Run/ }).click();
  await expect(page).toHaveURL(/sort=code/);
  await expect(runs.getByRole('columnheader', { name: /^Run/ })).toHaveAttribute('aria-sort', 'ascending');
  const codes = await runs.locator('tbody th a').allInnerTexts();
  expect(codes.length).toBeGreaterThan(0);
  expect(codes).toEqual([...codes].sort());
  for (const stage of await runs.locator('tbody tr td:nth-child(5)').allInnerTexts()) expect(stage.toLowerCase()).toContain('finished');
  expect(await page.getByRole('link', { name: /Export CSV/ }).getAttribute('href')).toBe('/api/runs/export.csv?sort=code&status=finished');

  await page.goto('/trials?status=running');
  const trials = page.getByRole('table', { name: 'Trials matching the filters' });
  await expect(trials).toBeVisible();
  await expect(page.getByRole('search', { name: 'Filter the trials' }).getByLabel('Status')).toHaveValue('running');
  for (const status of await trials.locator('tbody tr td:nth-child(3)').allInnerTexts()) expect(status.toLowerCase()).toContain('running');
});
