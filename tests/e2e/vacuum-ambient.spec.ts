import { expect, test } from './fixtures';

const WRITE_HEADERS = { 'x-lumenbook-csrf': '1' };

test.describe('the ambient pressure of a vacuum: altitude in the shop settings, the barometer on the stage form', () => {
  test.describe('as the admin', () => {
    test.use({ signedInAs: 'admin' });

    test('the altitude box is in the admin’s unit and questions an altitude no workshop has', async ({ page }) => {
      await page.goto('/admin/settings');
      await expect(page.getByRole('heading', { level: 1, name: 'Shop settings' })).toBeVisible();
      const altitude = page.getByLabel('Shop altitude above sea level (m)');
      await expect(altitude).toBeVisible();
      await expect(page.getByText(/higher than nearly any workshop/)).toHaveCount(0);
      // 5,000 typed for a shop at 5,000 ft: the box asks before anything is saved.
      await altitude.fill('5000');
      await expect(
        page.getByRole('status').filter({ hasText: /5,000 m is higher than nearly any workshop.*If you meant 5,000 ft, that is 1,524 m/ }),
      ).toBeVisible();
      await altitude.fill('1524');
      await expect(page.getByText(/higher than nearly any workshop/)).toHaveCount(0);
    });
  });

  test.describe('as a technician', () => {
    test.use({ signedInAs: 'technician' });

    test('the new-run form questions an altitude no workshop has, in the technician’s unit', async ({ page }) => {
      await page.goto('/runs/new');
      await expect(page.getByRole('heading', { level: 1, name: 'New run' })).toBeVisible();
      const altitude = page.getByLabel('Shop altitude for this run (optional) (m)');
      await altitude.fill('4000');
      await expect(
        page.getByRole('status').filter({ hasText: /4,000 m is higher than nearly any workshop.*If you meant 4,000 ft, that is 1,219 m/ }),
      ).toBeVisible();
      await altitude.fill('1219');
      await expect(page.getByText(/higher than nearly any workshop/)).toHaveCount(0);
    });

    test('a vacuum started with the shop’s barometer: the preview and the run page name it, and a reading past it is taken as 0 absolute', async ({ page }) => {
      const res = await page.request.post('/api/runs', { headers: WRITE_HEADERS, data: { chamber: `Barometer pot ${Date.now()}`, altitudeM: 0 } });
      expect(res.status(), await res.text()).toBe(201);
      const runId: number = (await res.json()).run.id;

      await page.goto(`/runs/${runId}`);
      await expect(page.getByRole('heading', { level: 1 })).toContainText(/^Run /);
      await page.getByRole('button', { name: 'Start vacuum…' }).click();
      const form = page.getByRole('form', { name: 'Start vacuum' });
      // Without a barometer the standard atmosphere at the run's altitude is named (ISO 2533, 101.325 kPa at sea level).
      await expect(form.getByText(/ISO 2533 standard atmosphere at 0 m, 101\.33 kPa/)).toBeVisible();
      await form.getByLabel('Gauge unit').selectOption('inHg');
      // 30.0 inHg = 101.59 kPa: past the standard sea-level ambient, within the weather allowance.
      await form.getByLabel('Gauge shows').fill('30');
      await expect(form.getByText(/= 0 absolute, 100 % vacuum: more vacuum than the standard atmosphere/)).toBeVisible();
      // The shop's barometer reads 102.5 kPa today: the same reading is 0.91 kPa absolute (by hand).
      await form.getByLabel('Shop barometer (optional) (kPa)').fill('102.5');
      await expect(form.getByText(/the shop's barometer, 102\.50 kPa/)).toBeVisible();
      await expect(form.getByText(/= 0\.91 kPa absolute, 99\.1 % vacuum against the barometer/)).toBeVisible();
      await form.getByRole('button', { name: 'Start vacuum' }).click();

      await expect(page.getByRole('status').filter({ hasText: 'Vacuum started.' })).toBeVisible();
      await expect(page.getByText(/Gauge readings at 0 m, against the shop's barometer, 102\.50 kPa/)).toBeVisible();
      // The run's history says what was recorded, the barometer included, and nothing about an oven.
      const newest = page
        .getByRole('region', { name: /History, newest first/ })
        .getByRole('listitem')
        .first();
      await expect(newest).toContainText('shop barometer: 102.50 kPa');
      await expect(newest).not.toContainText('oven');
    });

    test('a run’s altitude changed after readings: the form asks why, the readings are recomputed and the history keeps the reason', async ({ page }) => {
      const res = await page.request.post('/api/runs', { headers: WRITE_HEADERS, data: { chamber: `Moved pot ${Date.now()}`, altitudeM: 0 } });
      expect(res.status(), await res.text()).toBe(201);
      const runId: number = (await res.json()).run.id;
      const at = new Date(Date.now() - 2 * 3_600_000).toISOString();
      const stage = await page.request.post(`/api/runs/${runId}/stages`, {
        headers: WRITE_HEADERS,
        data: { stage: 'vacuum', startedAt: at, readings: [{ at, gaugeValue: 90, gaugeUnit: 'kPa' }] },
      });
      expect(stage.status(), await stage.text()).toBe(200);

      await page.goto(`/runs/${runId}`);
      await expect(page.getByRole('heading', { level: 1 })).toContainText(/^Run /);
      // At sea level (ISO 2533: 101.325 kPa) a 90 kPa gauge reading is 11.33 kPa absolute.
      await expect(page.getByRole('cell', { name: '11.33 kPa' })).toBeVisible();
      await page.getByRole('button', { name: 'Change details…' }).click();
      const form = page.getByRole('form', { name: "Change the run's details" });
      await form.getByLabel('Shop altitude for this run (m)').fill('1000');
      await form.getByRole('button', { name: 'Save the details' }).click();
      // The server refuses without a reason, and says so on the reason box; nothing changed.
      await expect(form.getByText(/A new altitude moves the absolute pressure of 1 recorded gauge reading; say why/)).toBeVisible();
      await form.getByLabel('Why the details change').fill('The run was in the upstairs shop, not at the coast');
      await form.getByRole('button', { name: 'Save the details' }).click();

      await expect(page.getByRole('status').filter({ hasText: "The run's details are saved." })).toBeVisible();
      // ISO 2533 / US Standard Atmosphere 1976: 89.88 kPa at 1,000 m, below the 90 kPa reading: taken as 0 absolute.
      await expect(page.getByText(/Gauge readings at 1,?000 m, against the standard atmosphere there, 89\.88 kPa/)).toBeVisible();
      await expect(page.getByRole('cell', { name: '0.00 kPa' })).toBeVisible();
      const history = page.getByRole('region', { name: /History, newest first/ });
      await expect(history.getByText('Reason: “The run was in the upstairs shop, not at the coast”').first()).toBeVisible();
    });
  });
});
