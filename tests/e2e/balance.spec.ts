import { expect, test } from './fixtures';

test.use({ signedInAs: 'technician', viewport: { width: 1280, height: 800 } });

const WRITE_HEADERS = { 'x-lumenbook-csrf': '1' };

/**
 * A stand-in for a balance on a USB-serial cable: the browser's Web Serial entry point answers with a port
 * whose bytes the test sends (`window.__balance(text)`). Everything after the port (line splitting, the
 * reading parser, the grid) is the app's own code, running as in use.
 */
const FAKE_SERIAL = () => {
  let push: ((bytes: Uint8Array) => void) | null = null;
  const readable = new ReadableStream<Uint8Array>({
    start(controller) {
      push = (bytes) => controller.enqueue(bytes);
    },
  });
  const port = { readable, open: async () => undefined, close: async () => undefined };
  Object.defineProperty(navigator, 'serial', { value: { requestPort: async () => port }, configurable: true });
  (window as unknown as { __balance: (text: string) => void }).__balance = (text: string) => push?.(new TextEncoder().encode(text));
};

test('weighing from a balance: settled readings go into the selected mass cell and down the column, a settling one is left out', async ({ page }) => {
  await page.addInitScript(FAKE_SERIAL);
  const species = await page.request.get('/api/species?pageSize=1');
  const resins = await page.request.get('/api/resins?pageSize=1');
  const stamp = Date.now().toString(36).toUpperCase();
  const trial = await page.request.post('/api/trials', {
    headers: WRITE_HEADERS,
    data: {
      title: `Balance journey ${stamp}`,
      question: 'Do readings from the balance land on the right coupons?',
      controlsPerSpecies: 0,
      conditions: [
        { speciesId: (await species.json()).items[0].id, resinId: (await resins.json()).items[0].id, processLabel: `Balance ${stamp}`, couponsWanted: 3 },
      ],
    },
  });
  expect(trial.status(), await trial.text()).toBe(201);
  const trialId: number = (await trial.json()).trial.id;
  const made = await page.request.post(`/api/trials/${trialId}/coupons`, { headers: WRITE_HEADERS });
  expect(made.ok(), await made.text()).toBeTruthy();
  const tags = ((await made.json()).coupons as { tag: string }[]).map((c) => c.tag).sort();

  await page.goto(`/trials/${trialId}/coupons`);
  await expect(page.getByRole('grid')).toBeVisible();
  const dry = (tag: string) => page.getByRole('textbox', { name: new RegExp(`^Dry mass \\(g\\), coupon ${tag}`) });
  await dry(tags[0]!).click();

  await page.getByText('Weigh into the grid from a balance').click();
  await page.getByRole('button', { name: 'Connect a balance…' }).click();
  const status = page.getByRole('status').filter({ hasText: /Balance connected|→|settling/ });
  await expect(status).toContainText('Balance connected at 9600 baud');

  // A settling reading, then the settled one for the first coupon, then one for the second (split across two sends).
  await page.evaluate(() => (window as unknown as { __balance: (t: string) => void }).__balance('US,+0012.301 g\r\n'));
  await expect(status).toContainText('still settling, left out');
  await page.evaluate(() => (window as unknown as { __balance: (t: string) => void }).__balance('ST,+0012.345 g\r\nST,+00'));
  await expect(dry(tags[0]!)).toHaveValue('12.345');
  await expect(status).toContainText(`→ ${tags[0]}, dry mass: 12.345 g`);
  await page.evaluate(() => (window as unknown as { __balance: (t: string) => void }).__balance('13.050 g\r\n'));
  await expect(dry(tags[1]!)).toHaveValue('13.05');
  // The next cell down is selected for the next coupon on the pan.
  await expect(dry(tags[2]!)).toBeFocused();
  await expect(page.getByText('2 rows typed, not saved.')).toBeVisible();

  await page.getByRole('button', { name: 'Save' }).click();
  await expect(page.getByRole('status').filter({ hasText: /Saved/ })).toBeVisible();
  await expect(page.getByText('No unsaved values.')).toBeVisible();
});
