import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { monitorEventLoopDelay, performance as perf } from 'node:perf_hooks';
import Papa from 'papaparse';
import { afterAll, bench, describe } from 'vitest';
import { openDatabase, type Database_ } from '../../db/client';
import { startHarness } from '../../testing/harness';
import { rebuildResults } from '../../measurements/results';
import { addCoupons as addCouponsOf, describeServerFigures, measureServerAlone, scaleFile, type ServerFigures } from '../../../bench/imports-server';

// The import of a generated 100,000-row scale file, end to end through the API (upload → detect →
// preview → commit), against the floor: a bare papaparse parse of the same text plus better-sqlite3
// prepared inserts of the same rows (tag → coupon id through a Map) in one transaction, foreign keys on.
// The floor runs BENCH_ROUNDS times (5 by default, each on a database of its own) and its median is taken;
// the end to end runs once in this process (the ratio, the main thread's longest stall and busy share are
// printed). Then the same import by a server alone, in a child process, BENCH_ROUNDS times with a fresh
// server each, right after a floor of its own (its RSS, CPU, and /api/health answer times seen from outside:
// bench/imports-server.ts); the median of those rounds' ratios is the one that leaves the test client out. The figures are written to bench/imports-latest.txt with
// the load average; what they mean: bench/imports-results.md.

const N = 100_000;
const text = scaleFile(N);
const bytes = Buffer.from(`${text}\r\n`);
const addCoupons = (d: Database_) => addCouponsOf(d, N);

const h = await startHarness();
addCoupons(h.database);
// Every path that creates coupons writes their results rows (the server rebuilds them at start when
// some are missing), so the import updates existing rows as it would in a shop.
h.database.db.transaction((tx) => rebuildResults(tx));
const tech = await h.signIn('tech@demo.test');
/**
 * The floor and the server alone are measured ROUNDS times each: on a shared machine one run of either
 * moves by ±20 % from one minute to the next. Each floor round has a database of its own, so every round
 * inserts into the same empty weighings table. `floorTimes` holds the first ROUNDS floors (the in-process
 * ratio uses their median); the floors paired with the server rounds are kept in `pairedFloors`.
 */
const ROUNDS = Number(process.env.BENCH_ROUNDS ?? 5);
const floorDir = fs.mkdtempSync(path.join(os.tmpdir(), 'lumenbook-floor-'));
// One more floor database per server round: each server round is paired with a floor measured just before it.
const floorDbs = Array.from({ length: 2 * ROUNDS }, (_, i) => {
  const d = openDatabase(path.join(floorDir, `floor-${i}.db`));
  d.sqlite.exec("insert into species (common_name, botanical_name, origin, source) values ('Floor wood', 'Lignum floor', 'shop-measured', 'bench')");
  addCoupons(d);
  return d;
});
const floorTimes: number[] = [];
const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? (s[(s.length - 1) / 2] as number) : ((s[s.length / 2 - 1] as number) + (s[s.length / 2] as number)) / 2;
};
const times: Record<string, number> = {};
const loop = monitorEventLoopDelay({ resolution: 10 });
/** /api/health asked every 50 ms while the import runs: how many answers, and the slowest. */
const health = { answers: 0, slowest: 0, on: false };
/** Resident memory sampled with the health checks: before the import, and the highest while it ran. */
const rss = { before: 0, peak: 0, maxBefore: 0 };
async function pollHealth() {
  rss.before = process.memoryUsage().rss;
  rss.maxBefore = process.resourceUsage().maxRSS * 1024;
  while (health.on) {
    rss.peak = Math.max(rss.peak, process.memoryUsage().rss);
    const t0 = performance.now();
    await tech.get('/api/health').expect(200);
    health.answers++;
    health.slowest = Math.max(health.slowest, performance.now() - t0);
    await new Promise((r) => setTimeout(r, 50));
  }
}

async function settle(id: number) {
  for (;;) {
    // As the client asks: the server holds each poll until the job ends, or 500 ms.
    const res = await tech.get(`/api/imports/${id}?wait=500`);
    if (res.body.status !== 'previewing' && res.body.status !== 'committing') return res.body;
  }
}

const once = { iterations: 1, time: 0, warmupIterations: 0, warmupTime: 0 };

describe(`import of ${N.toLocaleString('en')} readings`, () => {
  bench(
    `floor: papaparse + prepared inserts in one transaction (${ROUNDS} rounds)`,
    () => {
      // Once, whatever number of times the runner calls this: each round needs its database as set up.
      if (floorTimes.length === 0) for (const floorDb of floorDbs.slice(0, ROUNDS)) floorOnce(floorDb);
      times.floor = median(floorTimes);
    },
    once,
  );

  function floorOnce(floorDb: Database_) {
    const t0 = performance.now();
    const rows = Papa.parse<string[]>(text, { skipEmptyLines: true }).data.slice(1);
    const ids = new Map(
      floorDb.sqlite
        .prepare('select id, tag from coupons')
        .all()
        .map((r) => [(r as { tag: string }).tag, (r as { id: number }).id]),
    );
    const ins = floorDb.sqlite.prepare("insert into weighings (coupon_id, stage, mass_g, measured_at) values (?, 'dry', ?, ?)");
    floorDb.sqlite.transaction(() => {
      for (const r of rows) ins.run(ids.get(r[0] as string), Number(r[1]), `${r[3]}T${r[4]}.000Z`);
    })();
    const ms = performance.now() - t0;
    if (floorTimes.length < ROUNDS) floorTimes.push(ms);
    return ms;
  }

  bench(
    'end to end: upload → detect → preview → commit',
    async () => {
      loop.enable();
      health.on = true;
      const polling = pollHealth();
      const t0 = performance.now();
      const up = await tech.post('/api/imports').attach('file', bytes, 'bench-100k.csv');
      if (up.status !== 201) throw new Error(JSON.stringify(up.body));
      const d = up.body;
      const s = d.detected.suggested;
      const mapping = {
        format: { encoding: 'utf-8', delimiter: ',', hasHeader: true, decimal: '.', dateOrder: 'ymd' },
        target: { mode: 'tag', tagColumn: s.tagColumn },
        massColumn: s.massColumn,
        unitColumn: s.unitColumn,
        dateColumn: s.dateColumn,
        timeColumn: s.timeColumn,
        stage: 'dry',
      };
      times.upload = performance.now() - t0;
      // CPU time of this process per phase: less moved by other people's work on a shared machine than the wall clock.
      let cpu0 = process.cpuUsage();
      const cpuSince = () => {
        const u = process.cpuUsage(cpu0);
        cpu0 = process.cpuUsage();
        return (u.user + u.system) / 1000;
      };
      // The main thread's longest stall and busy share per phase (the commit's transaction runs here a slice
      // at a time, so the busy share is high while the stalls stay short).
      let elu0 = perf.eventLoopUtilization();
      const phase = (name: string) => {
        times[`${name}Stall`] = loop.max / 1e6;
        loop.reset();
        const e = perf.eventLoopUtilization(elu0);
        elu0 = perf.eventLoopUtilization();
        times[`${name}Elu`] = e.utilization;
      };
      phase('upload');
      await tech.post(`/api/imports/${d.id}/preview`).send({ mapping }).expect(202);
      const p = await settle(d.id);
      times.preview = performance.now() - t0 - times.upload;
      times.previewCpu = cpuSince();
      phase('preview');
      await tech.post(`/api/imports/${d.id}/commit`).send({ mapping }).expect(202);
      const c = await settle(d.id);
      times.commitCpu = cpuSince();
      phase('commit');
      times.total = performance.now() - t0;
      loop.disable();
      health.on = false;
      await polling;
      if (c.status !== 'committed' || c.counts.accepted !== N)
        throw new Error(`commit ended ${c.status}: ${c.error} ${JSON.stringify(c.counts)} (preview ${JSON.stringify(p.counts)})`);
    },
    once,
  );

  bench(
    `server alone: a child process driven over HTTP (RSS, CPU, health answers; ${ROUNDS} rounds, a fresh server each)`,
    async () => {
      // Each round: a floor, then the server alone, a few seconds apart, so a machine that slows down or speeds
      // up between rounds moves both; the ratio is each round's, and the median of those is reported.
      if (servers.length === 0)
        for (let i = 0; i < ROUNDS; i++) {
          pairedFloors.push(floorOnce(floorDbs[ROUNDS + i] as Database_));
          servers.push(await measureServerAlone(N));
        }
      // The round of median end-to-end time is the one described in full.
      const byTotal = [...servers].sort((a, b) => a.ms.total - b.ms.total);
      server = byTotal[Math.floor((byTotal.length - 1) / 2)] ?? null;
    },
    once,
  );
});

let server: ServerFigures | null = null;
const servers: ServerFigures[] = [];
/** The floor measured just before each server round. */
const pairedFloors: number[] = [];

afterAll(async () => {
  const mb = (b: number) => `${(b / 1024 / 1024).toFixed(0)} MB`;
  const pct = (x: number | undefined) => `${((x ?? NaN) * 100).toFixed(0)} %`;
  const floor = times.floor ?? NaN;
  const total = times.total ?? NaN;
  const summary = [
    `import of ${N} rows (${mb(bytes.length)} file):`,
    `  floor (parse + prepared inserts, one transaction): ${floor.toFixed(0)} ms, the median of ${floorTimes.map((t) => t.toFixed(0)).join(', ')} ms`,
    `  end to end: ${total.toFixed(0)} ms (upload+detect ${times.upload?.toFixed(0)} ms, preview ${times.preview?.toFixed(0)} ms, commit ${(total - (times.upload ?? 0) - (times.preview ?? 0)).toFixed(0)} ms)`,
    `  CPU time of this process: preview ${times.previewCpu?.toFixed(0)} ms, commit ${times.commitCpu?.toFixed(0)} ms`,
    `  ratio end to end / floor: ${(total / floor).toFixed(2)}`,
    `  RSS of this process (server and client together): ${mb(rss.before)} before the import, ${mb(rss.peak)} at its highest during it (+${mb(rss.peak - rss.before)}); high-water mark ${mb(rss.maxBefore)} before the import (setup and floor), ${mb(process.resourceUsage().maxRSS * 1024)} after it`,
    `  longest event-loop stall of the main thread: upload ${times.uploadStall?.toFixed(0)} ms, preview ${times.previewStall?.toFixed(0)} ms, commit ${times.commitStall?.toFixed(0)} ms`,
    `  main thread busy (event-loop utilisation): preview ${pct(times.previewElu)}, commit ${pct(times.commitElu)}`,
    `  /api/health during the import: ${health.answers} answers, slowest ${health.slowest.toFixed(0)} ms`,
  ].join('\n');
  console.log(summary);
  // The server alone's import against the floor of this same run: the figure without the test client in the process.
  const serverSummary = server
    ? [
        `${describeServerFigures(server)}`,
        `  server alone, every round: end to end ${servers.map((x) => x.ms.total.toFixed(0)).join(', ')} ms, each after a floor of ${pairedFloors.map((x) => x.toFixed(0)).join(', ')} ms; peak RSS ${servers.map((x) => x.rssPeakMb).join(', ')} MB`,
        `  ratio end to end of the server alone / the floor just before it, per round: ${servers.map((x, i) => (x.ms.total / (pairedFloors[i] as number)).toFixed(2)).join(', ')}; median ${median(servers.map((x, i) => x.ms.total / (pairedFloors[i] as number))).toFixed(2)}`,
        // The floor moves by itself too (its own garbage collection, the disk): a quotient of two noisy
        // figures per round is noisier than either. The medians of all rounds are the steadier figure.
        `  ratio of the medians: the server alone's median end to end ${median(servers.map((x) => x.ms.total)).toFixed(0)} ms / the median of all ${floorTimes.length + pairedFloors.length} floors of this run ${median([...floorTimes, ...pairedFloors]).toFixed(0)} ms = ${(median(servers.map((x) => x.ms.total)) / median([...floorTimes, ...pairedFloors])).toFixed(2)}`,
      ].join('\n')
    : 'server alone: not measured';
  const load = os.loadavg().map((x) => x.toFixed(2));
  const report = [
    `Written by server/features/imports/imports.bench.ts on ${new Date().toISOString()}, load average ${load.join(', ')} (${os.cpus().length} cores)`,
    '',
    summary,
    serverSummary,
    '',
  ].join('\n');
  console.log(serverSummary);
  fs.writeFileSync(path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../../bench/imports-latest.txt'), report);
  for (const d of floorDbs) d.close();
  fs.rmSync(floorDir, { recursive: true, force: true });
  await h.close();
});
