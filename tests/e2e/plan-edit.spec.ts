import { expect, test } from './fixtures';

test.use({ signedInAs: 'technician' });

// Planning is revised before coupons are made: the saved plan comes back into the same form.
test('a technician reopens a saved plan, adds controls, and the trial shows the new plan', async ({ page }) => {
  await page.goto('/trials');
  await page.getByRole('link', { name: 'T26-002' }).click();
  await expect(page.getByRole('heading', { level: 1 })).toContainText('T26-002');
  await page.getByRole('link', { name: 'Edit the plan' }).click();

  const form = page.getByRole('form', { name: 'Edit the plan' });
  // The saved values are in the boxes.
  await expect(form.getByLabel('Title')).not.toHaveValue('');
  await expect(form.getByLabel('Untreated controls per species')).toHaveValue('0');
  await form.getByLabel('Untreated controls per species').fill('3');
  await form.getByRole('button', { name: 'Save the plan' }).click();

  await expect(page.getByRole('heading', { level: 1 })).toContainText('T26-002');
  await expect(page.getByText('3 untreated')).toBeVisible();
  // Six treated coupons as before, and now three controls for the one species.
  await expect(page.getByText('0 of 9 planned made')).toBeVisible();
});
