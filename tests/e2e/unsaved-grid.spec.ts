import { expect, test, type Page } from '@playwright/test';

const WRITE_HEADERS = { 'x-lumenbook-csrf': '1' };

async function signIn(page: Page, email: string) {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill('lumenbook-demo');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByRole('navigation', { name: 'Main' })).toBeVisible();
}

test('typed grid values survive a click on another menu item and a reload, and leave only when the user says so', async ({ page }) => {
  await signIn(page, 'tech@demo.test');
  const species = await page.request.get('/api/species?pageSize=5');
  const speciesId: number = (await species.json()).items[0].id;
  const tag = `E2E-DRAFT-${Date.now().toString(36).toUpperCase()}`;
  const coupon = await page.request.post('/api/coupons', { headers: WRITE_HEADERS, data: { tag, speciesId, role: 'treated' } });
  expect(coupon.status(), await coupon.text()).toBe(201);
  const run = await page.request.post('/api/runs', {
    headers: WRITE_HEADERS,
    data: { chamber: 'Draft test pot', couponIds: [(await coupon.json()).coupon.id] },
  });
  const runId: number = (await run.json()).run.id;

  await page.goto(`/runs/${runId}/coupons`);
  const dry = page.getByRole('textbox', { name: new RegExp(`^Dry mass \\(\\w+\\), coupon ${tag}`) });
  await dry.fill('25.10');
  await expect(page.getByText('1 row typed, not saved.')).toBeVisible();

  // Another menu item: the app asks first, and staying keeps the value.
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Bench', exact: true }).click();
  const ask = page.getByRole('alertdialog', { name: 'Leave with unsaved values?' });
  await expect(ask).toBeVisible();
  await ask.getByRole('button', { name: 'Stay and keep them' }).click();
  await expect(ask).toHaveCount(0);
  await expect(dry).toHaveValue('25.10');

  // A reload (or a crash, or a closed tab) loses nothing: the draft comes back from this browser.
  page.once('dialog', (d) => void d.accept());
  await page.reload();
  await expect(dry).toHaveValue('25.10');
  await expect(page.getByText(/Restored values typed here/)).toBeVisible();

  // Leaving on purpose goes.
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Bench', exact: true }).click();
  await page.getByRole('alertdialog').getByRole('button', { name: 'Leave without saving' }).click();
  await expect(page).toHaveURL(/\/$/);
});
