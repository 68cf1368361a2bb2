/**
 * How long the Compare screen takes to draw its plots with many coupons, in Chromium.
 *
 *   npm run build && npx tsx bench/compare-render.ts [coupons=10000] [port=3990] [runs=5]
 *
 * Writes the demo shop plus `coupons` generated ones (server/features/analysis/generated-shop.ts) into a
 * fresh DATA_DIR, starts the production server on `port`, signs in with Debian's /usr/bin/chromium and
 * opens /compare (every coupon) `runs` times. For each run it reports: the overview request (server time
 * plus transfer), the drawing (from the answer's arrival until every plot's points are in the page) and
 * the whole (navigation to the first screen drawn: every plot in the window; plots further down are drawn
 * as they come near), then the time to scroll to each other plot in turn until it is drawn. Writes the
 * medians into bench/compare-results.md (the "client" section). PROFILE=file saves a CPU profile and
 * TRACE=file a Chromium trace of the last visit. A measurement, not a test: the machine may be shared.
 */
import { execSync, spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { chromium } from 'playwright-core';
import { openDatabase } from '../server/db/client';
import { prepareDataDir } from '../server/db/data-dir';
import { addGeneratedCoupons } from '../server/features/analysis/generated-shop';
import { seedDemo } from '../server/seed';
import { writeSection } from './results-file';

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
  const rows: { request: number; draw: number; whole: number; busy: number; all: number; allBusy: number; points: number; shown: string }[] = [];
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
    // TRACE=file: a Chromium trace of the last visit (layout, style, paint, scripts), for chrome://tracing.
    const tracing = process.env.TRACE && i === runs - 1;
    if (tracing) await browser.startTracing(page, { path: process.env.TRACE, categories: ['devtools.timeline', 'disabled-by-default-devtools.timeline'] });
    const b0 = await busy();
    const t0 = performance.now();
    await page.goto('/compare');
    // The first screen drawn: the WPG–SG plot has its dots and every plot figure that shows in the
    // window holds its chart (plots further down are drawn as they come near; timed below).
    await page.waitForFunction(
      () => {
        // Positions are asked only once the dots are there: asking forces a layout, which the polling must not add.
        if (document.querySelectorAll('[data-testid="plot-wpg-sg"] svg[role="img"] g.coupon-points > *').length === 0) return false;
        const figures = [...document.querySelectorAll('figure')].filter((f) => f.querySelector('[download], button'));
        const inView = figures.filter((f) => f.getBoundingClientRect().top < window.innerHeight);
        return inView.length > 0 && inView.every((f) => f.querySelector('svg[role="img"]'));
      },
      undefined,
      { polling: 'raf', timeout: 120_000 },
    );
    const t1 = performance.now();
    const b1 = await busy();
    if (profiling) fs.writeFileSync(process.env.PROFILE as string, JSON.stringify((await cdp.send('Profiler.stop')).profile));
    if (tracing) await browser.stopTracing();
    // Then every plot: scrolled to, one after the other, until each holds its chart.
    const figures = page.locator('figure:has(button)');
    const count = await figures.count();
    for (let k = 0; k < count; k++) {
      await figures.nth(k).scrollIntoViewIfNeeded();
      await figures.nth(k).locator('svg[role="img"]').first().waitFor({ timeout: 120_000 });
    }
    const t2 = performance.now();
    const b2 = await busy();
    page.off('request', onRequest);
    page.off('requestfinished', onFinished);
    const points = await page.locator('[data-testid="plot-wpg-sg"] svg[role="img"] g.coupon-points > *').count();
    const shown = (await page.locator('[data-testid="plot-wpg-sg"] figcaption').textContent())?.match(/(\d+ of \d+|\d+) coupons? shown/)?.[0] ?? '?';
    rows.push({
      request: answered - requested,
      draw: t1 - answered,
      whole: t1 - t0,
      busy: b1 - b0 < 0 ? b1 : b1 - b0,
      all: t2 - t1,
      allBusy: b2 - b1,
      points,
      shown,
    });
    console.log(
      `run ${i + 1}: overview request ${(answered - requested).toFixed(0)} ms, drawing ${(t1 - answered).toFixed(0)} ms, whole ${(t1 - t0).toFixed(0)} ms (renderer busy ${(b1 - b0 < 0 ? b1 : b1 - b0).toFixed(0)} ms); ` +
        `scrolling through the other ${count - 1} plots ${(t2 - t1).toFixed(0)} ms (busy ${(b2 - b1).toFixed(0)} ms); WPG–SG plot: ${points} dots (${shown})`,
    );
  }
  const m = (f: (r: (typeof rows)[number]) => number) => median(rows.map(f)).toFixed(0);
  const summary =
    `median of ${runs} over ${coupons} generated coupons plus the demo shop: request ${m((r) => r.request)} ms, ` +
    `drawing ${m((r) => r.draw)} ms, whole ${m((r) => r.whole)} ms, renderer busy ${m((r) => r.busy)} ms; ` +
    `then scrolling through every other plot ${m((r) => r.all)} ms (busy ${m((r) => r.allBusy)} ms) (load ${os.loadavg()[0]?.toFixed(1)})`;
  console.log(summary);
  writeSection(
    'client',
    [
      `Client: the Compare screen in Chromium (/usr/bin/chromium, 1280×900) over the demo shop plus ${coupons.toLocaleString('en')} generated coupons, median of ${runs} visits.`,
      `\`npm run build && npx tsx bench/compare-render.ts ${coupons}\`, ${new Date().toISOString().slice(0, 16)}Z, \`${execSync('uptime').toString().trim()}\`.`,
      '',
      '| overview request | drawing (answer → first screen drawn) | whole (navigation → first screen drawn) | renderer busy | then every other plot, scrolled to in turn | its renderer busy | WPG–SG dots |',
      '|---|---|---|---|---|---|---|',
      `| ${m((r) => r.request)} ms | ${m((r) => r.draw)} ms | ${m((r) => r.whole)} ms | ${m((r) => r.busy)} ms | ${m((r) => r.all)} ms | ${m((r) => r.allBusy)} ms | ${rows[0]?.points} (${rows[0]?.shown}) |`,
      '',
      'The first visit includes the server reading every coupon once (nothing held yet); the others are served from its cache.',
      'Target: the page renders in ≤ 1 s ("whole").',
    ].join('\n'),
  );
  await browser.close();
} finally {
  server.kill();
  fs.rmSync(dataDir, { recursive: true, force: true });
}
