import path from 'node:path';
import AxeBuilder from '@axe-core/playwright';
import { test as base, expect, type Page } from '@playwright/test';

// Shared by every browser journey: the demo accounts, sign-in once per role (storage state), and the axe scan.

export const DEMO_PASSWORD = 'lumenbook-demo';
export const DEMO_USERS = {
  admin: 'admin@demo.test',
  reviewer: 'reviewer@demo.test',
  technician: 'tech@demo.test',
  viewer: 'viewer@demo.test',
} as const;
export type DemoRole = keyof typeof DEMO_USERS;

/** Where the setup project keeps each role's signed-in browser state (cookies) for this run. */
export const authFile = (role: DemoRole) => path.join('tests', 'e2e', '.auth', `${role}.json`);

/** Signs in through the form, as a person does. Journeys about signing in use this; others use `signedInAs`. */
export async function signIn(page: Page, email: string, password = DEMO_PASSWORD) {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByRole('navigation', { name: 'Main' })).toBeVisible();
}

/**
 * `test.use({ signedInAs: 'technician' })`: every page of the test starts signed in as that demo role (the
 * session made once by tests/e2e/auth.setup.ts). Such tests must not sign out: that would end the shared session.
 */
export const test = base.extend<{ signedInAs: DemoRole | null }>({
  signedInAs: [null, { option: true }],
  storageState: async ({ signedInAs, storageState }, provide) => {
    await provide(signedInAs ? authFile(signedInAs) : storageState);
  },
});
export { expect };

/**
 * Serious and critical axe findings on the page as it is now, one line each. `targetSize` also checks
 * WCAG 2.2's minimum target size (24 × 24 px, or spaced apart), which axe leaves off unless asked: the
 * phone-width screens are used with a thumb.
 */
export async function seriousViolations(page: Page, { targetSize = false }: { targetSize?: boolean } = {}): Promise<string[]> {
  const builder = new AxeBuilder({ page });
  if (targetSize) builder.options({ rules: { 'target-size': { enabled: true } } });
  const results = await builder.analyze();
  return results.violations
    .filter((v) => v.impact === 'serious' || v.impact === 'critical')
    .map((v) => `${v.id}: ${v.help} (${v.nodes.map((n) => n.target.join(' ')).join(', ')})`);
}
