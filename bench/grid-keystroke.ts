// Keystroke-to-next-frame in the entry grid, measured in Chromium against the production build.
//
//   npm run bench:grid                      (builds, then measures a trial grid of 500 and of 2,000 coupons)
//   npm run bench:grid -- --no-build        (uses the dist/ already built)
//   BENCH_SIZES=30,500 BENCH_KEYS=80 npm run bench:grid
//
// For each size it starts the server on a throw-away data folder (demo data), creates an invented trial
// with that many coupons, opens its grid at 1280 × 900, and types digits into the dry-mass column. Per key
// it records, in the page, the time from the keydown to the end of the input event's handlers ("script":
// React's work), to the first animation frame after the input event
// ("frame": React has rendered by then) and to a message task after that frame ("painted": layout and paint done).
// Median, p95 and max per size; the targets are ≤ 16 ms at 500 rows and ≤ 50 ms at 2,000. A report, not a
// test: the figures depend on the machine and its load, so say what else ran beside it.
import { execSync, spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { chromium, type Page } from '@playwright/test';

const PORT = Number(process.env.BENCH_PORT ?? 4300);
const SIZES = (process.env.BENCH_SIZES ?? '500,2000').split(',').map(Number);
const KEYS = Number(process.env.BENCH_KEYS ?? 50);
const TARGET_MS: Record<number, number> = { 500: 16, 2000: 50 };
const BASE = `http://localhost:${PORT}`;
const WRITE = { 'x-lumenbook-csrf': '1' };

if (!process.argv.includes('--no-build')) execSync('npm run build', { stdio: 'inherit' });

const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'lumenbook-bench-grid-'));
const server = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
  env: { ...process.env, NODE_ENV: 'production', PORT: String(PORT), DATA_DIR: dataDir, LOG_LEVEL: 'warn', LOGIN_RATE_LIMIT: '1000' },
  stdio: ['ignore', 'ignore', 'inherit'],
});

async function waitForServer() {
  for (let i = 0; i < 240; i++) {
    try {
      if ((await fetch(`${BASE}/api/health`)).ok) return;
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 500));
  }
  throw new Error(`The server did not answer on ${BASE} within 2 minutes`);
}

/** An invented trial with `size` treated coupons (100 per condition, no controls); returns its id. */
async function growTrial(page: Page, size: number): Promise<number> {
  const species = (await (await page.request.get('/api/species?pageSize=5')).json()).items as { id: number }[];
  const resins = (await (await page.request.get('/api/resins?pageSize=5')).json()).items as { id: number }[];
  const conditions = Array.from({ length: Math.ceil(size / 100) }, (_, i) => ({
    speciesId: species[i % species.length]!.id,
    resinId: resins[0]!.id,
    processLabel: `Bench setting ${i + 1}`,
    couponsWanted: Math.min(100, size - i * 100),
  }));
  const trial = await page.request.post('/api/trials', {
    headers: WRITE,
    data: { title: `Grid bench, ${size} coupons`, question: 'How fast does the grid answer a key?', controlsPerSpecies: 0, conditions },
  });
  if (trial.status() !== 201) throw new Error(`Creating the trial: ${trial.status()} ${await trial.text()}`);
  const id = (await trial.json()).trial.id as number;
  const coupons = await page.request.post(`/api/trials/${id}/coupons`, { headers: WRITE, timeout: 300_000 });
  if (!coupons.ok()) throw new Error(`Creating the coupons: ${coupons.status()} ${await coupons.text()}`);
  return id;
}

declare global {
  interface Window {
    __benchT0?: number;
    __benchLat?: { script: number; frame: number; painted: number }[];
    __benchScript?: number;
  }
}

async function measure(page: Page, trialId: number, size: number) {
  const started = Date.now();
  await page.goto(`/trials/${trialId}/coupons`);
  const grid = page.getByRole('grid');
  await grid.waitFor({ timeout: 180_000 });
  const rows = await grid.getAttribute('aria-rowcount');
  if (Number(rows) - 2 !== size) throw new Error(`The grid says ${rows} rows, expected ${size} + 2 header rows`);
  const loadMs = Date.now() - started;
  const rendered = await grid.locator('tbody tr[data-index]').count();
  await page.evaluate(() => {
    window.__benchLat = [];
    // Capture on the document: before React's own listeners, so the frame measured includes its render.
    document.addEventListener('keydown', () => (window.__benchT0 = performance.now()), true);
    // Bubbling to the window comes after React's listener on its root: the handlers' and the render's time.
    window.addEventListener('input', () => (window.__benchScript = performance.now() - (window.__benchT0 ?? performance.now())));
    document.addEventListener(
      'input',
      () => {
        const t0 = window.__benchT0 ?? performance.now();
        requestAnimationFrame(() => {
          const frame = performance.now() - t0;
          // A message task runs after the frame's style, layout and paint (a timer may be clamped).
          const channel = new MessageChannel();
          channel.port1.onmessage = () => window.__benchLat!.push({ script: window.__benchScript ?? 0, frame, painted: performance.now() - t0 });
          channel.port2.postMessage(null);
        });
      },
      true,
    );
  });
  // Baseline: the same keys into a plain text box outside React on the same page, for what the browser and
  // the machine's load cost without any of the grid's work.
  await page.evaluate(() => {
    const box = document.createElement('input');
    box.id = 'bench-baseline';
    box.setAttribute('aria-label', 'Bench baseline');
    box.style.cssText = 'position:fixed;top:0;left:0;z-index:99';
    document.body.append(box);
  });
  await page.locator('#bench-baseline').focus();
  for (let k = 0; k < KEYS; k++) {
    await page.keyboard.press(String(k % 10));
    await page.waitForFunction((n) => (window.__benchLat?.length ?? 0) >= n, k + 1);
  }
  const baseline = await page.evaluate(() => window.__benchLat!.splice(0));
  await page.evaluate(() => document.getElementById('bench-baseline')?.remove());
  await grid.getByRole('textbox').first().focus();
  const digits = '20.48';
  let measured = 0;
  let i = 0;
  while (measured < KEYS) {
    const ch = digits[i % digits.length]!;
    i++;
    await page.keyboard.press(ch);
    measured++;
    await page.waitForFunction((n) => (window.__benchLat?.length ?? 0) >= n, measured);
    // Down to the next coupon after each value, as at the bench (not measured: no input event).
    if (i % digits.length === 0) await page.keyboard.press('Enter');
  }
  const lat = await page.evaluate(() => window.__benchLat!);
  const stat = (xs: number[]) => {
    const s = [...xs].sort((a, b) => a - b);
    const q = (p: number) => s[Math.min(s.length - 1, Math.ceil(p * s.length) - 1)]!;
    return { median: q(0.5), p95: q(0.95), max: s[s.length - 1]! };
  };
  return {
    size,
    loadMs,
    rendered,
    script: stat(lat.map((l) => l.script)),
    frame: stat(lat.map((l) => l.frame)),
    painted: stat(lat.map((l) => l.painted)),
    baseScript: stat(baseline.map((l) => l.script)),
    baseFrame: stat(baseline.map((l) => l.frame)),
    basePainted: stat(baseline.map((l) => l.painted)),
  };
}

const fmt = (n: number) => n.toFixed(1).padStart(6);
try {
  await waitForServer();
  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
  try {
    const context = await browser.newContext({ baseURL: BASE, viewport: { width: 1280, height: 900 } });
    const page = await context.newPage();
    await page.goto('/sign-in');
    await page.getByLabel('E-mail').fill('tech@demo.test');
    await page.getByLabel('Password').fill('lumenbook-demo');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('navigation', { name: 'Main' }).waitFor();
    const results = [];
    for (const size of SIZES) results.push(await measure(page, await growTrial(page, size), size));
    console.log(
      `\nEntry grid, keystroke to next frame (ms), ${KEYS} keys per size, Chromium ${browser.version()}, ${os.cpus().length} cores, load ${os
        .loadavg()
        .map((l) => l.toFixed(1))
        .join(' ')}`,
    );
    console.log('  rows  rows in page  load (ms)   script median    p95   frame median    p95    max   painted median    p95    max   target');
    for (const r of results) {
      const target = TARGET_MS[r.size];
      const verdict = target === undefined ? '' : `≤ ${target} ${r.frame.median <= target ? 'met' : 'MISSED'} (median)`;
      console.log(
        `${String(r.size).padStart(6)} ${String(r.rendered).padStart(13)} ${String(r.loadMs).padStart(10)}   ${fmt(r.script.median)} ${fmt(r.script.p95)}   ${fmt(r.frame.median)} ${fmt(r.frame.p95)} ${fmt(r.frame.max)}   ${fmt(r.painted.median)} ${fmt(r.painted.p95)} ${fmt(r.painted.max)}   ${verdict}`,
      );
      console.log(
        `${'plain box'.padStart(6)} ${''.padStart(13)} ${''.padStart(10)}   ${fmt(r.baseScript.median)} ${fmt(r.baseScript.p95)}   ${fmt(r.baseFrame.median)} ${fmt(r.baseFrame.p95)} ${fmt(r.baseFrame.max)}   ${fmt(r.basePainted.median)} ${fmt(r.basePainted.p95)} ${fmt(r.basePainted.max)}   (same keys, no React, same page)`,
      );
    }
  } finally {
    await browser.close();
  }
} finally {
  server.kill();
  fs.rmSync(dataDir, { recursive: true, force: true });
}
