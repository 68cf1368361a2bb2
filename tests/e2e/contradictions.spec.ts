import type { APIRequestContext } from '@playwright/test';
import { expect, test } from './fixtures';

test.use({ signedInAs: 'technician' });

const WRITE = { 'x-lumenbook-csrf': '1' };
const HOUR = 3_600_000;

/** A trial of our own with two soak lengths of one species and the dyed demo resin, its coupons made. */
async function twoSoakTrial(request: APIRequestContext) {
  const species = (await (await request.get('/api/species?pageSize=200')).json()).items as { id: number; commonName: string }[];
  const resins = (await (await request.get('/api/resins?pageSize=200')).json()).items as { id: number; name: string }[];
  const dyed = resins.find((r) => /dyed/i.test(r.name))!;
  const sp = species[0]!;
  const stamp = Date.now().toString(36);
  const base = { speciesId: sp.id, resinId: dyed.id, vacuumMinutes: 240, cureTempC: 107, cureMinutes: 150, couponsWanted: 3 };
  const created = await request.post('/api/trials', {
    headers: WRITE,
    data: {
      title: `Soak length check ${stamp}`,
      question: 'Does an overnight soak take up more resin than a two-hour soak?',
      controlsPerSpecies: 1,
      conditions: [
        { ...base, processLabel: `2 h soak ${stamp}`, soakMinutes: 120 },
        { ...base, processLabel: `overnight soak ${stamp}`, soakMinutes: 720 },
      ],
    },
  });
  expect(created.status(), await created.text()).toBe(201);
  const trial = (await created.json()).trial as { id: number; code: string };
  const made = await request.post(`/api/trials/${trial.id}/coupons`, { headers: WRITE });
  expect(made.status(), await made.text()).toBeLessThan(300);
  return { trial, stamp, resin: dyed };
}

test('contradictions are named at the moment of entry and the technician goes on deliberately', async ({ page }) => {
  const { trial, stamp } = await twoSoakTrial(page.request);

  // The new-run picker shows each coupon's condition and picks by condition.
  await page.goto('/runs/new');
  await expect(page.getByRole('heading', { level: 1, name: 'New run' })).toBeVisible();
  await page.getByLabel('Chamber').fill(`Contradiction pot ${stamp}`);
  // A clear-resin lot for coupons the trial planned with the dyed resin.
  const lotBox = page.getByLabel('Resin lot');
  const clearLot = await lotBox.locator('option', { hasText: 'CP-D2601' }).getAttribute('value');
  await lotBox.selectOption(clearLot!);
  const trialBox = page.getByLabel('From trial');
  await trialBox.selectOption((await trialBox.locator('option', { hasText: trial.code }).getAttribute('value'))!);
  const short = page.getByRole('group', { name: new RegExp(`2 h soak ${stamp}`) });
  const long = page.getByRole('group', { name: new RegExp(`overnight soak ${stamp}`) });
  await expect(short.getByRole('checkbox')).toHaveCount(3);
  await short.getByRole('button', { name: /Pick all 3 free coupons of this condition/ }).click();
  await expect(page.getByRole('status').filter({ hasText: /3 coupons picked, all of .*2 h soak/ })).toBeVisible();

  const warnings = page.getByRole('group', { name: /contradict/ });
  await expect(warnings.locator('[data-warning="lot-resin-differs"]')).toContainText(
    'Lot CP-D2601 is Crystal Pane 90, but the trial planned Ember Pane 90 (dyed)',
  );
  await expect(warnings.locator('[data-warning="conditions-mixed"]')).toHaveCount(0);

  // A coupon of the other soak length mixes conditions: said, with both conditions named.
  await long.getByRole('checkbox').first().check();
  await expect(warnings.locator('[data-warning="conditions-mixed"]')).toContainText('2 different trial conditions');
  await long.getByRole('checkbox').first().uncheck();
  await expect(warnings.locator('[data-warning="conditions-mixed"]')).toHaveCount(0);

  // Saving without the tick sends nothing and says why; with it, the run is made.
  await page.getByRole('button', { name: 'Create the run' }).click();
  await expect(page.getByRole('alert').filter({ hasText: 'Nothing was saved' })).toBeVisible();
  await expect(page).toHaveURL(/\/runs\/new$/);
  await warnings.getByRole('checkbox', { name: /create the run anyway/ }).check();
  await page.getByRole('button', { name: 'Create the run' }).click();
  await expect(page.getByRole('heading', { level: 1 })).toContainText(/^Run R/);
  const runId = Number(/\/runs\/(\d+)/.exec(page.url())![1]);

  // The run page keeps saying it.
  const onRun = page.getByRole('region', { name: "Contradictions in this run's records" });
  await expect(onRun.locator('[data-warning="lot-resin-differs"]')).toBeVisible();

  // A cured weight while the run is still drying: asked about on the coupon page.
  const dryingFrom = new Date(Date.now() - 2 * HOUR).toISOString();
  const drying = await page.request.post(`/api/runs/${runId}/stages`, { headers: WRITE, data: { stage: 'drying', startedAt: dryingFrom } });
  expect(drying.status(), await drying.text()).toBe(200);
  await page.reload();
  await page.getByRole('region', { name: 'Coupons in this run' }).getByRole('link').first().click();
  await expect(page.getByRole('heading', { level: 1 })).toContainText(/^Coupon /);
  const weighing = page.getByRole('form', { name: 'Add a weighing' });
  await weighing.getByLabel('Stage').selectOption('cured');
  await weighing.getByLabel(/^Mass/).fill('31.2');
  await expect(weighing.locator('[data-warning="weighing-ahead-of-run"]')).toContainText('is still at its drying stage');
  await weighing.getByRole('button', { name: 'Save the weighing' }).click();
  await expect(weighing.getByRole('alert').filter({ hasText: 'Nothing was saved' })).toBeVisible();
  await weighing.getByRole('checkbox', { name: /save the weighing anyway/ }).check();
  await weighing.getByRole('button', { name: 'Save the weighing' }).click();
  await expect(weighing.getByRole('status').filter({ hasText: 'Weighing saved.' })).toBeVisible();

  // The vacuum, started while the coupons have no dry weight.
  const ended = await page.request.post(`/api/runs/${runId}/stages`, {
    headers: WRITE,
    data: { stage: 'drying', startedAt: dryingFrom, endedAt: new Date(Date.now() - HOUR).toISOString() },
  });
  expect(ended.status(), await ended.text()).toBe(200);
  await page.goto(`/runs/${runId}`);
  await expect(onRun.locator('[data-warning="weighing-ahead-of-run"]')).toBeVisible();
  await expect(onRun.locator('[data-warning="vacuum-without-dry-weight"]')).toBeVisible();
  await page.getByRole('button', { name: 'Start vacuum…' }).click();
  const vacuum = page.getByRole('form', { name: 'Start vacuum' });
  await expect(vacuum.locator('[data-warning="vacuum-without-dry-weight"]')).toContainText('3 coupons have no dry weight yet');
  await vacuum.getByRole('button', { name: 'Start vacuum' }).click();
  await expect(vacuum.getByRole('alert').filter({ hasText: 'Nothing was saved' })).toBeVisible();
  await vacuum.getByRole('checkbox', { name: /start the vacuum anyway/ }).check();
  await vacuum.getByRole('button', { name: 'Start vacuum' }).click();
  await expect(page.getByRole('status').filter({ hasText: 'Vacuum started.' })).toBeVisible();
});
