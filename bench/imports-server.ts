import { execFileSync, spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { openDatabase, type Database_ } from '../server/db/client';
import { species } from '../server/db/schema/reference';
import { rebuildResults } from '../server/measurements/results';
import { DEMO_PASSWORD, seedDemo } from '../server/seed';
import { CSRF_HEADER, CSRF_VALUE } from '../shared/constants/errors';

// The import of a generated scale file by a server ALONE: the app started as `npm start` starts it (its
// bundle, dist/server/index.mjs; BENCH_SERVER=tsx: the sources through tsx), in a
// child process on a temp DATA_DIR holding N coupons, driven over HTTP from this process. Its resident
// memory and CPU are read from /proc (Linux), so neither the test client nor the file in this process is
// counted; /api/health is asked every 50 ms from here, so its answer times show what another user waits.
// Run alone: `npx tsx bench/imports-server.ts` (also run by server/features/imports/imports.bench.ts).

export const tagOf = (i: number) => `BX-${String(i).padStart(6, '0')}`;

/** A scale file of n readings (tag, mass, unit, date, time), one per coupon, CRLF as a PC's software writes it. */
export function scaleFile(n: number): string {
  return [
    'tag,mass,unit,date,time',
    ...Array.from(
      { length: n },
      (_, i) =>
        `${tagOf(i)},${(10 + (i % 997) / 100).toFixed(3)},g,2026-03-02,${String(8 + (Math.floor(i / 3600) % 12)).padStart(2, '0')}:${String(Math.floor(i / 60) % 60).padStart(2, '0')}:${String(i % 60).padStart(2, '0')}`,
    ),
  ].join('\r\n');
}

/** n treated coupons of the first species, tagged as scaleFile tags them, in one transaction. */
export function addCoupons(d: Database_, n: number) {
  const sp = d.db.select({ id: species.id }).from(species).limit(1).get()!.id;
  const ins = d.sqlite.prepare("insert into coupons (tag, species_id, role) values (?, ?, 'treated')");
  d.sqlite.transaction(() => {
    for (let i = 0; i < n; i++) ins.run(tagOf(i), sp);
  })();
}

/** The import's phases, then its undo. */
type Phase = 'upload' | 'preview' | 'commit' | 'undo';

export interface ServerFigures {
  rows: number;
  /** Resident memory of the server process: idle after start, highest during the import, the kernel's high-water mark. */
  rssIdleMb: number;
  rssPeakMb: number;
  rssHighWaterMb: number;
  /** The highest resident memory seen in each phase. */
  rssPeakByPhaseMb: Record<Phase, number>;
  /** Wall time and the server's CPU time (all its threads) per phase; `total` is the import's (upload to commit). */
  ms: Record<Phase, number> & { total: number };
  cpuMs: Record<Phase, number>;
  /** The CPU time of the main thread alone (the one that answers requests; other threads: libuv's pool, V8's helpers). */
  mainCpuMs: Record<Phase, number>;
  /** /api/health asked every 50 ms from this process, per phase: answers, the slowest, how many said `busy`. */
  health: Record<Phase, { answers: number; slowestMs: number; busy: number; failed: number }>;
  /** After the import, its undo (a job, as the commit): the highest resident memory seen while it ran. */
  rssPeakUndoMb: number;
}

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');

function procStatus(pid: number): { rss: number; hwm: number } {
  const s = fs.readFileSync(`/proc/${pid}/status`, 'utf8');
  const kb = (k: string) => Number(new RegExp(`${k}:\\s+(\\d+) kB`).exec(s)?.[1] ?? NaN) * 1024;
  return { rss: kb('VmRSS'), hwm: kb('VmHWM') };
}

/** utime + stime of the process (all threads), or of its main thread with `mainOnly`, in ms. */
function procCpuMs(pid: number, mainOnly = false): number {
  const stat = fs.readFileSync(mainOnly ? `/proc/${pid}/task/${pid}/stat` : `/proc/${pid}/stat`, 'utf8');
  const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
  return ((Number(fields[11]) + Number(fields[12])) * 1000) / 100; // clock ticks, 100 per second on Linux
}

/**
 * How the child starts the server: as `npm start` does, from its bundle (built here first, a second or so), or
 * with BENCH_SERVER=tsx from the TypeScript sources through tsx, as `npm run dev` does.
 */
function serverEntry(): string[] {
  if (process.env.BENCH_SERVER === 'tsx') return ['--import', 'tsx', 'server/index.ts'];
  execFileSync('npm', ['run', '--silent', 'build:server'], { cwd: root, stdio: 'inherit' });
  return ['dist/server/index.mjs'];
}

export async function measureServerAlone(n = 100_000, port = Number(process.env.BENCH_PORT ?? 3800)): Promise<ServerFigures> {
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'lumenbook-import-server-'));
  const db = openDatabase(path.join(dataDir, 'lumenbook.db'));
  seedDemo(db, { bcryptCost: 4 });
  addCoupons(db, n);
  db.db.transaction((tx) => rebuildResults(tx));
  db.close();
  const bytes = Buffer.from(`${scaleFile(n)}\r\n`);

  const child = spawn(
    process.execPath,
    // BENCH_CPU_PROF=<folder>: the server writes a CPU profile per thread there (open in Chrome's DevTools).
    [...(process.env.BENCH_CPU_PROF ? ['--cpu-prof', `--cpu-prof-dir=${process.env.BENCH_CPU_PROF}`] : []), ...serverEntry()],
    {
      cwd: root,
      env: { ...process.env, NODE_ENV: 'development', DATA_DIR: dataDir, PORT: String(port), HOST: '127.0.0.1', DEMO_DATA: 'true', LOG_LEVEL: 'warn' },
      stdio: ['ignore', 'pipe', 'pipe'],
    },
  );
  const pid = child.pid!;
  let stop = () => {};
  try {
    await new Promise<void>((resolve, reject) => {
      let out = '';
      child.stdout!.on('data', (d: Buffer) => {
        out += d.toString();
        if (out.includes('Lumenbook is serving')) resolve();
      });
      child.stderr!.on('data', (d: Buffer) => (out += d.toString()));
      child.once('exit', (code) => reject(new Error(`the server exited with ${code}: ${out}`)));
    });
    const base = `http://127.0.0.1:${port}`;
    const login = await fetch(`${base}/api/auth/login`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', [CSRF_HEADER]: CSRF_VALUE },
      body: JSON.stringify({ email: 'tech@demo.test', password: DEMO_PASSWORD }),
    });
    if (login.status !== 200) throw new Error(`sign-in failed: ${login.status}`);
    const cookie = login.headers
      .getSetCookie()
      .map((c) => c.split(';')[0])
      .join('; ');
    const headers = { cookie, [CSRF_HEADER]: CSRF_VALUE };
    const json = async (res: Response) => {
      const body = (await res.json()) as Record<string, unknown>;
      if (res.status >= 400) throw new Error(`${res.status}: ${JSON.stringify(body)}`);
      return body;
    };
    // Asked as the client asks (src/features/imports/api/imports-queries.ts): the server holds each poll
    // until the job ends, or 500 ms.
    const settle = async (id: number) => {
      for (;;) {
        const b = await json(await fetch(`${base}/api/imports/${id}?wait=500`, { headers }));
        if (b.status !== 'previewing' && b.status !== 'committing' && b.status !== 'undoing') return b;
      }
    };

    // Idle after start (the 100k coupons' tags are not loaded until an import needs them).
    await new Promise((r) => setTimeout(r, 500));
    const idle = procStatus(pid).rss;
    let peak = idle;
    let phase: Phase = 'upload';
    const health = {
      upload: { answers: 0, slowestMs: 0, busy: 0, failed: 0 },
      preview: { answers: 0, slowestMs: 0, busy: 0, failed: 0 },
      commit: { answers: 0, slowestMs: 0, busy: 0, failed: 0 },
      undo: { answers: 0, slowestMs: 0, busy: 0, failed: 0 },
    };
    let on = true;
    const byPhase = { upload: 0, preview: 0, commit: 0, undo: 0 };
    const sampler = setInterval(() => {
      const rss = procStatus(pid).rss;
      peak = Math.max(peak, rss);
      byPhase[phase] = Math.max(byPhase[phase], rss);
    }, 20);
    stop = () => {
      on = false;
      clearInterval(sampler);
    };
    const poller = (async () => {
      while (on) {
        const t0 = performance.now();
        const h = health[phase];
        try {
          const res = await fetch(`${base}/api/health`);
          const body = (await res.json()) as { database: string };
          h.answers++;
          if (body.database === 'busy') h.busy++;
        } catch {
          // A connection the server dropped while its event loop was held (keep-alive timing out).
          h.failed++;
        }
        h.slowestMs = Math.max(h.slowestMs, performance.now() - t0);
        await new Promise((r) => setTimeout(r, 50));
      }
    })();

    const ms = { upload: 0, preview: 0, commit: 0, undo: 0, total: 0 };
    const cpuMs = { upload: 0, preview: 0, commit: 0, undo: 0 };
    const mainCpuMs = { upload: 0, preview: 0, commit: 0, undo: 0 };
    let cpu0 = procCpuMs(pid);
    let main0 = procCpuMs(pid, true);
    let t0 = performance.now();
    const start = t0;
    const lap = (name: Phase) => {
      const t = performance.now();
      ms[name] = t - t0;
      t0 = t;
      const c = procCpuMs(pid);
      cpuMs[name] = c - cpu0;
      cpu0 = c;
      const m = procCpuMs(pid, true);
      mainCpuMs[name] = m - main0;
      main0 = m;
    };
    const form = new FormData();
    form.append('file', new Blob([bytes], { type: 'text/csv' }), 'bench-server.csv');
    const d = await json(await fetch(`${base}/api/imports`, { method: 'POST', headers, body: form }));
    const s = (d.detected as { suggested: Record<string, number | null> }).suggested;
    const mapping = {
      format: { encoding: 'utf-8', delimiter: ',', hasHeader: true, decimal: '.', dateOrder: 'ymd' },
      target: { mode: 'tag', tagColumn: s.tagColumn },
      massColumn: s.massColumn,
      unitColumn: s.unitColumn,
      dateColumn: s.dateColumn,
      timeColumn: s.timeColumn,
      stage: 'dry',
    };
    lap('upload');
    phase = 'preview';
    const post = (url: string, body: unknown) =>
      fetch(`${base}${url}`, { method: 'POST', headers: { ...headers, 'content-type': 'application/json' }, body: JSON.stringify(body) }).then(json);
    await post(`/api/imports/${d.id}/preview`, { mapping });
    await settle(d.id as number);
    lap('preview');
    phase = 'commit';
    await post(`/api/imports/${d.id}/commit`, { mapping });
    const c = await settle(d.id as number);
    lap('commit');
    ms.total = performance.now() - start;
    const counts = c.counts as { accepted: number };
    if (c.status !== 'committed' || counts.accepted !== n) throw new Error(`commit ended ${String(c.status)}: ${String(c.error)} ${JSON.stringify(c.counts)}`);
    // The import's own figures end here; the undo's are kept apart.
    const importPeak = peak;
    const importHighWater = procStatus(pid).hwm;
    phase = 'undo';
    await post(`/api/imports/${d.id}/undo`, { reason: 'benchmark' });
    const u = await settle(d.id as number);
    lap('undo');
    on = false;
    await poller;
    clearInterval(sampler);
    if (u.status !== 'undone') throw new Error(`undo ended ${String(u.status)}: ${String(u.error)}`);
    const mb = (b: number) => Math.round(b / 1024 / 1024);
    return {
      rows: n,
      rssIdleMb: mb(idle),
      rssPeakMb: mb(importPeak),
      rssHighWaterMb: mb(importHighWater),
      rssPeakUndoMb: mb(byPhase.undo),
      rssPeakByPhaseMb: { upload: mb(byPhase.upload), preview: mb(byPhase.preview), commit: mb(byPhase.commit), undo: mb(byPhase.undo) },
      ms,
      cpuMs,
      mainCpuMs,
      health,
    };
  } finally {
    stop();
    if (child.exitCode === null) {
      const exited = new Promise((r) => child.once('exit', r));
      child.kill('SIGTERM');
      await exited;
    }
    fs.rmSync(dataDir, { recursive: true, force: true });
  }
}

export function describeServerFigures(f: ServerFigures): string {
  const r = (x: number) => x.toFixed(0);
  const h = (p: keyof ServerFigures['health']) =>
    `${p} ${f.health[p].answers} answers, slowest ${r(f.health[p].slowestMs)} ms${f.health[p].busy ? ` (${f.health[p].busy} said busy)` : ''}`;
  return [
    `server alone (a child process, ${f.rows} readings over HTTP):`,
    `  wall: upload+detect ${r(f.ms.upload)} ms, preview ${r(f.ms.preview)} ms, commit ${r(f.ms.commit)} ms, total ${r(f.ms.total)} ms`,
    `  server CPU (all threads): upload+detect ${r(f.cpuMs.upload)} ms, preview ${r(f.cpuMs.preview)} ms, commit ${r(f.cpuMs.commit)} ms`,
    `  server CPU of its main thread: upload+detect ${r(f.mainCpuMs.upload)} ms, preview ${r(f.mainCpuMs.preview)} ms, commit ${r(f.mainCpuMs.commit)} ms`,
    `  RSS: ${f.rssIdleMb} MB idle after start, ${f.rssPeakMb} MB at its highest during the import (upload ${f.rssPeakByPhaseMb.upload}, preview ${f.rssPeakByPhaseMb.preview}, commit ${f.rssPeakByPhaseMb.commit} MB), high-water mark ${f.rssHighWaterMb} MB`,
    `  /api/health every 50 ms from another process: ${h('upload')}; ${h('preview')}; ${h('commit')}`,
    `  undo of the import (a job, one transaction a slice at a time): wall ${r(f.ms.undo)} ms, server CPU ${r(f.cpuMs.undo)} ms (main thread ${r(f.mainCpuMs.undo)} ms), RSS at its highest ${f.rssPeakUndoMb} MB`,
    `  /api/health during the undo: ${h('undo')}`,
  ].join('\n');
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const n = Number(process.argv[2] ?? 100_000);
  console.log(describeServerFigures(await measureServerAlone(n)));
}
