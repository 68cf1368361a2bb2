import { test as setup } from '@playwright/test';
import { authFile, DEMO_USERS, signIn, type DemoRole } from './fixtures';

// Signs each demo role in once per run and keeps the session cookie for the journeys (`signedInAs`).
for (const role of Object.keys(DEMO_USERS) as DemoRole[]) {
  setup(`sign in as ${role}`, async ({ page }) => {
    await signIn(page, DEMO_USERS[role]);
    await page.context().storageState({ path: authFile(role) });
  });
}
