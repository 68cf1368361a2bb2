import type { Page } from '@playwright/test';
import { expect, test } from './fixtures';

// Every main screen in one unit choice must show no unit of the other: a US shop reading "83.53 kPa"
// or "93–121 °C" has to convert in its head. The admin sees every screen and every form.
test.use({ signedInAs: 'admin' });

const WRITE = { 'x-lumenbook-csrf': '1' };

/** Forms that open behind a button are opened before the screen is read. */
const OPEN: Record<string, string> = {
  '/reference': 'Add a species',
  '/reference?tab=resins': 'Add a resin',
  '/reference?tab=lots': 'Activate a new lot',
};

const SCREENS = [
  '/',
  '/trials',
  '/trials/1',
  '/trials/new',
  '/runs',
  '/runs/1',
  '/runs/3',
  '/runs/new',
  '/coupons',
  '/coupons/1',
  '/reference',
  '/reference?tab=resins',
  '/reference?tab=lots',
  '/compare',
  '/imports',
];

/**
 * A unit written after a number or as a label in brackets ("31.9 g", "1,234.5 g", "Mass (g)"), by quantity.
 * The number must start a word: a coupon tag made from a time stamp ("E2E-MX780J7N-1") holds "7N", which
 * is no force in newtons.
 */
const d = String.raw`(?<![\w.,])\d[\d.,]*\s?`;
const METRIC: Record<string, RegExp> = {
  g: new RegExp(`${d}g\\b|\\(g\\)`),
  kg: new RegExp(`${d}kg\\b(?!/)|\\(kg\\)`),
  mm: new RegExp(`${d}mm\\b(?!Hg)|\\(mm\\)`),
  '°C': /°C/,
  kPa: /kPa/,
  'cm³': /(?<!g\/)cm³/,
  'kg/m³': /kg\/m³/,
  'g/cm³': /(?<!k)g\/cm³/,
  m: new RegExp(`${d}m\\b|\\(m\\)`),
  N: new RegExp(`${d}N\\b|\\(N\\)`),
};
const US: Record<string, RegExp> = {
  oz: new RegExp(`${d}oz\\b|\\(oz\\)`),
  lb: new RegExp(`${d}lb\\b(?!/)|\\(lb\\)`),
  // "25.4 in", "× 0.39 in", "(in)"; not "Pane 90 in Maple", where a name with a number meets the word.
  in: new RegExp(`${d}in(?=\\s*($|[)×,;·]))|\\(in\\)`),
  '°F': /°F/,
  inHg: /inHg/,
  'in³': /in³/,
  'lb/ft³': /lb\/ft³/,
  ft: new RegExp(`${d}ft\\b|\\(ft\\)`),
  lbf: /lbf/,
};
// Resin volumes (mL, L, gal) are left out: chamber names and lot notes are the shop's own words ("10 L pot",
// "2 mL dye per litre") and would be flagged; the lot volume column is checked through its unit label.

/**
 * The visible text of the screen's main part, line by line, leaving out what is shown as it was entered
 * on purpose (`data-units-as-entered`: a gauge's own reading in the unit printed on the gauge) and the
 * option lists of unit pickers.
 */
async function visibleLines(page: Page): Promise<string[]> {
  return page.locator('main').evaluate((main) => {
    const out: string[] = [];
    const walker = document.createTreeWalker(main, NodeFilter.SHOW_TEXT);
    for (let n = walker.nextNode(); n; n = walker.nextNode()) {
      const el = n.parentElement;
      if (!el || el.closest('[data-units-as-entered], select, script, style, .sr-only')) continue;
      if (!el.checkVisibility()) continue;
      const text = (n.textContent ?? '').trim();
      if (text) out.push(text);
    }
    // A number and its unit may sit in two elements ("1600" and " m"): whole lines of the rendered text
    // catch those, with the parts left out above hidden for the moment of reading.
    const skipped = [...main.querySelectorAll<HTMLElement>('[data-units-as-entered], select')];
    const before = skipped.map((el) => el.style.display);
    skipped.forEach((el) => (el.style.display = 'none'));
    const lines = (main as HTMLElement).innerText.split('\n');
    skipped.forEach((el, i) => (el.style.display = before[i] ?? ''));
    return [...out, ...lines];
  });
}

async function strays(page: Page, forbidden: Record<string, RegExp>): Promise<string[]> {
  const found: string[] = [];
  for (const path of SCREENS) {
    await page.goto(path);
    await expect(page.getByRole('heading', { level: 1 })).toBeVisible();
    await expect(page.getByRole('status').filter({ hasText: /^Loading/ })).toHaveCount(0);
    const button = OPEN[path];
    if (button) await page.getByRole('button', { name: button, exact: true }).click();
    for (const line of new Set(await visibleLines(page)))
      for (const [unit, re] of Object.entries(forbidden)) {
        const m = re.exec(line);
        if (m) found.push(`${path}: “${m[0]}” (${unit}) in “${line.slice(Math.max(0, m.index - 60), m.index + 60)}”`);
      }
  }
  return [...new Set(found)];
}

async function choose(page: Page, body: Record<string, unknown>) {
  const res = await page.request.patch('/api/auth/me', { headers: WRITE, data: body });
  expect(res.status(), await res.text()).toBe(200);
}

test.afterEach(async ({ page }) => {
  // The admin's session is shared by the other journeys: give it back its metric units.
  await choose(page, { unitSystem: 'metric' });
});

test('in the US preset no screen shows a metric unit', async ({ page }) => {
  test.setTimeout(180_000);
  await choose(page, { unitSystem: 'us' });
  expect(await strays(page, METRIC)).toEqual([]);
});

test('in a mixed choice (g, in, °F, inHg, g/cm³) no screen shows a unit the user did not choose', async ({ page }) => {
  test.setTimeout(180_000);
  await choose(page, { unitSystem: 'us', units: { mass: 'g', density: 'gPerCm3' } });
  const { g: _g, 'g/cm³': _gcm3, ...notG } = METRIC;
  expect(await strays(page, { ...notG, oz: US.oz!, lb: US.lb!, 'lb/ft³': US['lb/ft³']! })).toEqual([]);
});

test('in the metric preset no screen shows a US unit', async ({ page }) => {
  test.setTimeout(180_000);
  await choose(page, { unitSystem: 'metric' });
  expect(await strays(page, US)).toEqual([]);
});
