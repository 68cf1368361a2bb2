import AxeBuilder from '@axe-core/playwright';
import { expect, test, type Browser, type Page } from '@playwright/test';

// The fourth everyday job: a technician writes a finding with evidence and submits it; a reviewer
// follows the e-mail link, comments, and approves with the password; a viewer reads the wiki page with
// its frozen plot and signature, and verifies the signature.

async function signIn(page: Page, email: string) {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill('lumenbook-demo');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByRole('navigation', { name: 'Main' })).toBeVisible();
}

async function person(browser: Browser, email: string) {
  const context = await browser.newContext();
  const page = await context.newPage();
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(e.message));
  await signIn(page, email);
  return { page, errors, close: () => context.close() };
}

async function expectAccessible(page: Page, what: string) {
  await page.waitForLoadState('networkidle');
  const results = await new AxeBuilder({ page }).analyze();
  const bad = results.violations
    .filter((v) => v.impact === 'serious' || v.impact === 'critical')
    .map((v) => `${what} ${v.id}: ${v.help} (${v.nodes.map((n) => n.target.join(' ')).join(', ')})`);
  expect(bad).toEqual([]);
}

const XSS = '<img src=x onerror="window.__xss=1"><script>window.__xss=2</script>';

test('a finding goes from draft to the wiki across three roles, and its signature verifies', async ({ browser }) => {
  test.setTimeout(180_000);

  // ── technician: a saved view of Compare, then the draft ──
  const tech = await person(browser, 'tech@demo.test');
  const saved = await tech.page.request.post('/api/evidence', {
    headers: { 'x-lumenbook-csrf': '1' },
    data: { title: 'Uptake against density, demo trial', view: {} },
  });
  expect(saved.status(), await saved.text()).toBe(201);

  await tech.page.goto('/findings');
  await expectAccessible(tech.page, 'findings list');
  await tech.page.getByRole('link', { name: 'Write a finding' }).click();
  await expect(tech.page.getByRole('heading', { level: 1, name: 'Write a finding' })).toBeVisible();
  await expectAccessible(tech.page, 'new finding');
  await tech.page.getByLabel('Title').fill('Lighter species took up more resin');
  await tech.page.getByRole('button', { name: 'Start the draft' }).click();

  const draft = tech.page.getByRole('region', { name: 'Draft' });
  await expect(draft).toBeVisible();
  await draft
    .getByLabel('Body (Markdown)')
    .fill(`In the demo trial the **lighter** species gained the most weight, as the plot shows.\n\n${XSS}\n\n[notes](https://example.org/notes)`);
  await draft.getByLabel('Species').selectOption({ label: 'Maple, red' });
  await expect(draft.getByRole('status')).toContainText('All changes saved');
  await expect(tech.page.getByRole('region', { name: 'Preview' }).locator('strong', { hasText: 'lighter' })).toBeVisible();

  await tech.page.getByLabel('Saved view to attach').selectOption({ index: 1 });
  await tech.page.getByRole('button', { name: 'Attach (frozen copy)' }).click();
  const figure = tech.page.getByRole('figure', { name: 'Evidence: Uptake against density, demo trial' });
  await expect(figure.getByRole('img')).toBeVisible();
  await expectAccessible(tech.page, 'finding draft');

  await tech.page.getByRole('button', { name: 'Submit for review' }).click();
  await expect(tech.page.getByText('In review', { exact: true })).toBeVisible();
  const findingUrl = new URL(tech.page.url()).pathname;
  expect(tech.errors).toEqual([]);
  await tech.close();

  // ── the review request, as mailed: read from Admin → Outbox, whose links are clickable ──
  const admin = await person(browser, 'admin@demo.test');
  await admin.page.goto('/admin/outbox');
  const mail = admin.page.getByRole('article', { name: 'Review requested: Lighter species took up more resin' }).filter({ hasText: 'reviewer@demo.test' });
  const link = mail.getByRole('link', { name: new RegExp(`${findingUrl}$`) });
  await expect(link).toBeVisible();
  const href = await link.getAttribute('href');
  expect(href).toMatch(new RegExp(`^http://localhost:\\d+${findingUrl}$`));
  await admin.close();

  // ── reviewer: follows the link, checks the payload is inert, comments, signs ──
  const reviewer = await person(browser, 'reviewer@demo.test');
  await reviewer.page.goto(href!);
  await expect(reviewer.page.getByRole('heading', { level: 1, name: 'Lighter species took up more resin' })).toBeVisible();
  await expect(reviewer.page.getByRole('region', { name: 'Finding' })).toContainText('<img src=x onerror=');
  expect(await reviewer.page.evaluate(() => (window as unknown as { __xss?: number }).__xss)).toBeUndefined();
  await expect(reviewer.page.getByRole('link', { name: 'notes' })).toHaveAttribute('rel', 'noopener noreferrer');
  await expectAccessible(reviewer.page, 'finding in review');

  await reviewer.page.getByLabel('Comment (Markdown)').fill(`Checked against the plot. ${XSS}`);
  await reviewer.page.getByRole('button', { name: 'Add comment' }).click();
  await expect(reviewer.page.getByRole('listitem').filter({ hasText: 'Checked against the plot.' })).toBeVisible();

  await reviewer.page.getByLabel('Approved for the shop wiki').check();
  await reviewer.page.getByLabel('Your password (to sign)').fill('not-my-password');
  await reviewer.page.getByRole('button', { name: 'Sign and approve' }).click();
  await expect(reviewer.page.getByRole('alert').filter({ hasText: 'The password is not right' })).toBeVisible();
  await reviewer.page.getByLabel('Your password (to sign)').fill('lumenbook-demo');
  await reviewer.page.getByRole('button', { name: 'Sign and approve' }).click();
  await expect(reviewer.page.getByText('Approved', { exact: true })).toBeVisible();
  await expect(reviewer.page.getByRole('region', { name: 'Electronic signature' })).toContainText('Ilse Marrow (quality)');
  expect(await reviewer.page.evaluate(() => (window as unknown as { __xss?: number }).__xss)).toBeUndefined();
  expect(reviewer.errors).toEqual([]);
  await reviewer.close();

  // ── viewer: the wiki, search by a word of the body, the page with its frozen plot, verify ──
  const viewer = await person(browser, 'viewer@demo.test');
  await viewer.page.goto('/wiki');
  await expectAccessible(viewer.page, 'wiki index');
  await viewer.page.getByLabel('Search the wiki').fill('lighter');
  await viewer.page.getByRole('button', { name: 'Search' }).click();
  await expect(viewer.page.locator('mark', { hasText: /lighter/i }).first()).toBeVisible();
  await viewer.page.getByRole('link', { name: 'Lighter species took up more resin' }).first().click();
  await expect(viewer.page.getByRole('heading', { level: 1, name: 'Lighter species took up more resin' })).toBeVisible();
  await expect(viewer.page.getByRole('figure', { name: 'Evidence: Uptake against density, demo trial' }).getByRole('img')).toBeVisible();
  const footer = viewer.page.getByRole('region', { name: 'Electronic signature' });
  await expect(footer).toContainText('Signed by Ilse Marrow (quality) — Approved for the shop wiki');
  await footer.getByRole('button', { name: 'Verify signature' }).click();
  await expect(footer.getByRole('status')).toContainText('Intact');
  await expect(viewer.page.getByRole('link', { name: /Export/ })).toHaveAttribute('href', /\/api\/wiki\/.+\/export$/);
  await expectAccessible(viewer.page, 'wiki page');
  expect(viewer.errors).toEqual([]);
  await viewer.close();
});
