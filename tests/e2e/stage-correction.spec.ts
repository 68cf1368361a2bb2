import { expect, test, type Page } from '@playwright/test';

const WRITE_HEADERS = { 'x-lumenbook-csrf': '1' };
const HOUR = 3_600_000;

async function signIn(page: Page, email: string) {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill('lumenbook-demo');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByRole('navigation', { name: 'Main' })).toBeVisible();
}

test('a technician corrects a recorded cure temperature with a reason, and the run history keeps the old value', async ({ page }) => {
  await signIn(page, 'tech@demo.test');
  // A finished vacuum and soak and a cure with its oven temperatures, recorded through the API as the stage form would.
  const t0 = Date.now() - 20 * HOUR;
  const at = (h: number) => new Date(t0 + h * HOUR).toISOString();
  const run = await page.request.post('/api/runs', { headers: WRITE_HEADERS, data: { chamber: 'Correction test pot', altitudeM: 0 } });
  expect(run.status(), await run.text()).toBe(201);
  const runId: number = (await run.json()).run.id;
  for (const body of [
    { stage: 'vacuum', startedAt: at(0), endedAt: at(4), readings: [{ at: at(2), gaugeValue: 28, gaugeUnit: 'inHg' }] },
    { stage: 'soak', startedAt: at(4), endedAt: at(13) },
    { stage: 'cure', startedAt: at(14), endedAt: at(17), ovenSetC: 110, ovenMeasuredC: 104 },
  ]) {
    const res = await page.request.post(`/api/runs/${runId}/stages`, { headers: WRITE_HEADERS, data: body });
    expect(res.status(), await res.text()).toBe(200);
  }

  await page.goto(`/runs/${runId}`);
  const cure = page.locator('#stage-cure');
  await expect(cure.getByText('104.0 °C')).toBeVisible();
  await cure.getByRole('button', { name: 'Correct the cure stage' }).click();
  const form = page.getByRole('form', { name: 'Correct the cure stage' });
  await form.getByLabel('Thermometer in the oven (°C)').fill('107.5');
  // Without a reason the form says what is missing and nothing changes.
  await form.getByRole('button', { name: 'Save the correction' }).click();
  await expect(form.getByText(/Say why the record changes/)).toBeVisible();
  await form.getByLabel(/Why the record changes/).fill('Second thermometer read 107.5, the first was off the shelf');
  await form.getByRole('button', { name: 'Save the correction' }).click();

  await expect(page.getByRole('status').filter({ hasText: 'Cure corrected' })).toBeVisible();
  await expect(cure.getByText('107.5 °C')).toBeVisible();
  const history = page.getByRole('region', { name: /History, newest first/ });
  const newest = history.getByRole('listitem').first();
  await expect(newest).toContainText('corrected the cure stage');
  await expect(newest).toContainText('oven thermometer: 104.0 °C → 107.5 °C');
  await expect(newest).toContainText('Reason: “Second thermometer read 107.5, the first was off the shelf”');

  // Sending the stage form again with another value is refused; the correction is the way.
  const resend = await page.request.post(`/api/runs/${runId}/stages`, {
    headers: WRITE_HEADERS,
    data: { stage: 'cure', startedAt: at(14), ovenMeasuredC: 99 },
  });
  expect(resend.status()).toBe(409);
});
