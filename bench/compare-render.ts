/**
 * How long the Compare screen takes to draw its plots with many coupons, in Chromium.
 *
 *   npm run build && npx tsx bench/compare-render.ts [coupons=10000] [port=3990] [runs=5]
 *
 * Writes the demo shop plus `coupons` generated ones (server/features/analysis/generated-shop.ts) into a
 * fresh DATA_DIR, starts the production server on `port`, signs in with Debian's /usr/bin/chromium and
 * opens /compare (every coupon) `runs` times. For each run it reports: the overview request (server time
 * plus transfer), the drawing (from the answer's arrival until every plot's points are in the page) and
 * the whole (navigation to every plot drawn). A measurement, not a test: the machine may be shared.
 */
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { chromium } from 'playwright-core';
import { openDatabase } from '../server/db/client';
import { prepareDataDir } from '../server/db/data-dir';
import { addGeneratedCoupons } from '../server/features/analysis/generated-shop';
import { seedDemo } from '../server/seed';

const coupons = Number(process.argv[2] ?? 10_000);
const port = Number(process.argv[3] ?? 3990);
const runs = Number(process.argv[4] ?? 5);

const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'lumenbook-render-'));
prepareDataDir(dataDir);
const database = openDatabase(path.join(dataDir, 'lumenbook.db'));
seedDemo(database);
addGeneratedCoupons(database, coupons);
database.close();

const server = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
  env: { ...process.env, NODE_ENV: 'production', PORT: String(port), DATA_DIR: dataDir, LOG_LEVEL: 'warn', LOGIN_RATE_LIMIT: '1000' },
  stdio: ['ignore', 'ignore', 'inherit'],
});
const base = `http://localhost:${port}`;

async function waitForServer() {
  for (let i = 0; i < 600; i++) {
    try {
      if ((await fetch(`${base}/api/health`)).ok) return;
    } catch {
      // not up yet
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error('the server did not start');
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)] as number;

try {
  await waitForServer();
  const browser = await chromium.launch({ executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium' });
  const page = await browser.newPage({ baseURL: base, viewport: { width: 1280, height: 900 } });
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill('viewer@demo.test');
  await page.getByLabel('Password').fill('lumenbook-demo');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByRole('navigation', { name: 'Main' }).waitFor();

  // The renderer's main-thread busy time (Chromium's TaskDuration) is less swayed by other load than the wall clock.
  const cdp = await page.context().newCDPSession(page);
  await cdp.send('Performance.enable');
  const busy = async () => ((await cdp.send('Performance.getMetrics')).metrics.find((m) => m.name === 'TaskDuration')?.value ?? 0) * 1000;
  const rows: { request: number; draw: number; whole: number; busy: number; points: number; shown: string }[] = [];
  for (let i = 0; i < runs; i++) {
    await page.goto('/');
    await page.getByRole('navigation', { name: 'Main' }).waitFor();
    let answered = 0;
    let requested = 0;
    const onRequest = (r: { url(): string }) => {
      if (r.url().includes('/api/analysis/overview')) requested = performance.now();
    };
    const onFinished = (r: { url(): string }) => {
      if (r.url().includes('/api/analysis/overview')) answered = performance.now();
    };
    page.on('request', onRequest);
    page.on('requestfinished', onFinished);
    // PROFILE=file: a CPU profile of the renderer during the last visit, for chrome://inspect or a summary.
    const profiling = process.env.PROFILE && i === runs - 1;
    if (profiling) {
      await cdp.send('Profiler.enable');
      await cdp.send('Profiler.start');
    }
    const b0 = await busy();
    const t0 = performance.now();
    await page.goto('/compare');
    // Every plot drawn: the WPG–SG plot has its dots and every plot figure holds its chart.
    await page.waitForFunction(
      () => {
        const dots = document.querySelectorAll('[data-testid="plot-wpg-sg"] svg[role="img"] g.coupon-points > *').length;
        const figures = [...document.querySelectorAll('figure')].filter((f) => f.querySelector('[download], button'));
        return dots > 0 && figures.length > 0 && figures.every((f) => f.querySelector('svg[role="img"]'));
      },
      undefined,
      { polling: 'raf', timeout: 120_000 },
    );
    const t1 = performance.now();
    const b1 = await busy();
    if (profiling) fs.writeFileSync(process.env.PROFILE as string, JSON.stringify((await cdp.send('Profiler.stop')).profile));
    page.off('request', onRequest);
    page.off('requestfinished', onFinished);
    const points = await page.locator('[data-testid="plot-wpg-sg"] svg[role="img"] g.coupon-points > *').count();
    const shown = (await page.locator('[data-testid="plot-wpg-sg"] figcaption').textContent())?.match(/(\d+ of \d+|\d+) coupons? shown/)?.[0] ?? '?';
    rows.push({ request: answered - requested, draw: t1 - answered, whole: t1 - t0, busy: b1 - b0, points, shown });
    console.log(
      `run ${i + 1}: overview request ${(answered - requested).toFixed(0)} ms, drawing ${(t1 - answered).toFixed(0)} ms, whole ${(t1 - t0).toFixed(0)} ms (renderer busy ${(b1 - b0).toFixed(0)} ms); WPG–SG plot: ${points} dots (${shown})`,
    );
  }
  console.log(
    `median of ${runs} over ${coupons} generated coupons plus the demo shop: request ${median(rows.map((r) => r.request)).toFixed(0)} ms, ` +
      `drawing ${median(rows.map((r) => r.draw)).toFixed(0)} ms, whole ${median(rows.map((r) => r.whole)).toFixed(0)} ms, renderer busy ${median(rows.map((r) => r.busy)).toFixed(0)} ms (load ${os.loadavg()[0]?.toFixed(1)})`,
  );
  await browser.close();
} finally {
  server.kill();
  fs.rmSync(dataDir, { recursive: true, force: true });
}
