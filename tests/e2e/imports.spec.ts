import path from 'node:path';
import { fileURLToPath } from 'node:url';
import AxeBuilder from '@axe-core/playwright';
import { expect, test, type Page } from '@playwright/test';

const FIXTURE = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../fixtures/imports/demo-run-cured.csv');

async function signIn(page: Page, email: string) {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill('lumenbook-demo');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByRole('navigation', { name: 'Main' })).toBeVisible();
}

async function expectNoSeriousViolations(page: Page) {
  await page.waitForLoadState('networkidle');
  const results = await new AxeBuilder({ page }).analyze();
  const bad = results.violations
    .filter((v) => v.impact === 'serious' || v.impact === 'critical')
    .map((v) => `${v.id}: ${v.help} (${v.nodes.map((n) => n.target.join(' ')).join(', ')})`);
  expect(bad).toEqual([]);
}

// WPG = (m_cured − m_dry) / m_dry × 100 with the demo's dry masses: (57.60 − 38.08) / 38.08 = 51.26 %.
test('a technician imports a scale file, sees every problem row, commits, sees WPG on the coupon, then undoes', async ({ page }) => {
  test.setTimeout(180_000);
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(e.message));
  await signIn(page, 'tech@demo.test');
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Imports' }).click();
  await expect(page.getByRole('heading', { level: 1, name: 'Imports' })).toBeVisible();
  await expectNoSeriousViolations(page);

  await page.getByLabel('File', { exact: true }).setInputFiles(FIXTURE);
  await page.getByRole('button', { name: 'Upload and detect' }).click();
  await expect(page.getByRole('heading', { level: 1, name: 'Import: demo-run-cured.csv' })).toBeVisible();

  // What was detected, with the reasons; the dates read both ways, so the assumption is said.
  await expect(page.getByLabel('Columns separated by', { exact: true })).toHaveValue(';');
  await expect(page.getByLabel('Decimal mark', { exact: true })).toHaveValue(',');
  await expect(page.getByLabel('Dates are written', { exact: true })).toHaveValue('dmy');
  await expect(page.getByText(/Assumed: .*written with dots/)).toBeVisible();
  await expect(page.getByLabel('Coupon tag', { exact: true })).toHaveValue('2');
  await expect(page.getByLabel('Mass (the reading)', { exact: true })).toHaveValue('3');
  await expect(page.getByLabel('Stable/unstable flag', { exact: true })).toHaveValue('4');

  // Preview without a stage is refused on the field.
  await page.getByRole('button', { name: 'Preview' }).click();
  await expect(page.getByText('Choose the stage these readings were taken at')).toBeVisible();
  await page.getByLabel('Stage these readings were taken at', { exact: true }).selectOption('cured');
  await page.getByRole('button', { name: 'Preview' }).click();

  const preview = page.getByRole('region', { name: 'Preview' });
  await expect(preview.getByText(/5 rows read: 3 accepted, 1 skipped, 1 with problems/)).toBeVisible({ timeout: 30_000 });
  const problems = preview.getByRole('table', { name: /Each row with its column and the reason/ });
  await expect(problems.getByRole('row').filter({ hasText: 'No coupon is tagged "T26-001-YBU-EPD9-03"; did you mean T26-001-YBU-EPD90-03' })).toContainText(
    'Sample',
  );
  await expect(problems.getByRole('row').filter({ hasText: 'unstable' })).toContainText('5');
  await expect(preview.getByRole('cell', { name: '57.6 g' })).toBeVisible();
  await expectNoSeriousViolations(page);

  await page.getByRole('button', { name: 'Import readings' }).click();
  await expect(page.getByText('Imported', { exact: true })).toBeVisible({ timeout: 30_000 });
  await page.getByRole('link', { name: 'T26-001-RMA-EPD90-03' }).click();
  await expect(page.getByRole('heading', { level: 1, name: /T26-001-RMA-EPD90-03/ })).toBeVisible();
  await expect(page.getByText('57.6 g').first()).toBeVisible();
  await expect(page.getByText('51.3 %').first()).toBeVisible();

  await page.goBack();
  await expect(page.getByRole('heading', { level: 2, name: 'Undo this import' })).toBeVisible();
  await page.getByLabel('Why', { exact: true }).fill('weighed on the wrong day');
  await page.getByRole('button', { name: 'Undo import' }).click();
  await expect(page.getByText(/undone .* weighed on the wrong day/)).toBeVisible();
  await page.getByRole('link', { name: 'T26-001-RMA-EPD90-03' }).click();
  await expect(page.getByRole('heading', { level: 1, name: /T26-001-RMA-EPD90-03/ })).toBeVisible();
  await expect(page.getByText('51.3 %')).toHaveCount(0);
  expect(errors).toEqual([]);
});
