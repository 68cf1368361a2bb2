import os from 'node:os';
import { eq } from 'drizzle-orm';
import { users } from '../server/db/schema/auth';
import { startHarness } from '../server/testing/harness';
import { createMeasurements, type MeasurementEntry } from '../server/measurements/measurements';
import { rebuildResults, refreshResults } from '../server/measurements/results';
import { addCoupons, tagOf } from './imports-server';

// CPU time of an import's write inside its transaction, the part the commit runs slice by slice: `bulkAdd` of n
// dry weighings (one per coupon) judged again and trusted (the change counter unchanged), and refreshing
// the results rows of the n coupons alone. CPU time of this process (`process.cpuUsage`), which holds
// better than the wall clock on a shared machine; each figure is the median of a few runs, each in a
// transaction rolled back so every run starts from the same shop. Run: `npx tsx bench/results-refresh.ts [n]`.
// With `--cpu-prof` (node --import tsx --cpu-prof bench/results-refresh.ts) it gives a profile of the same work.

const n = Number(process.argv[2] ?? 100_000);
const runs = Number(process.argv[3] ?? 3);
const h = await startHarness();
addCoupons(h.database, n);
const { db, sqlite } = h.database;
// RESULTS_CACHE=<pages or -KiB>: the page cache of the connection (SQLite's default here is -16000, 16 MB).
if (process.env.RESULTS_CACHE) sqlite.pragma(`cache_size = ${process.env.RESULTS_CACHE}`);
db.transaction((tx) => rebuildResults(tx));
const actor = { id: db.select({ id: users.id }).from(users).where(eq(users.email, 'tech@demo.test')).get()!.id };
const ids = (sqlite.prepare('select id from coupons where tag >= ? and tag <= ? order by tag').all(tagOf(0), tagOf(n - 1)) as { id: number }[]).map(
  (r) => r.id,
);
const entries: MeasurementEntry[] = ids.map((couponId, i) => ({
  couponId,
  weighings: [{ stage: 'dry', massG: 10 + (i % 997) / 100, measuredAt: '2026-03-02T08:00:00.000Z' }],
}));
const m = createMeasurements({ now: () => new Date() });

class Rollback extends Error {}
/** CPU ms of `work` inside a transaction that is then rolled back. */
function cpuOf(work: (tx: typeof db) => void): number {
  let ms = 0;
  try {
    db.transaction((tx) => {
      const t0 = process.cpuUsage();
      work(tx);
      const u = process.cpuUsage(t0);
      ms = (u.user + u.system) / 1000;
      throw new Rollback();
    });
  } catch (e) {
    if (!(e instanceof Rollback)) throw e;
  }
  // A rolled-back transaction this big has spilled pages into the WAL: empty it, so every run starts alike.
  sqlite.pragma('wal_checkpoint(TRUNCATE)');
  return ms;
}
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)] as number;
const measure = (work: (tx: typeof db) => void) => median(Array.from({ length: runs }, () => cpuOf(work)));

const opts = { skipRefused: true, audit: 'per-source' } as const;
const judged = measure((tx) => m.bulkAdd(tx, actor, 'import:1', entries, opts));
const trusted = measure((tx) => m.bulkAdd(tx, actor, 'import:1', entries, { ...opts, judgedAt: m.changeCounter(tx) }));
// The results rows of coupons that have just received their readings, as inside an import's commit.
db.transaction((tx) => m.bulkAdd(tx, actor, 'import:1', entries, opts));
const refresh = measure((tx) => void refreshResults(tx, ids));
const load = os.loadavg().map((x) => x.toFixed(2));
console.log(
  [
    `${new Date().toISOString()}, load average ${load.join(', ')} (${os.cpus().length} cores), ${n} coupons, median of ${runs} runs, CPU ms:`,
    `  bulkAdd, judged again:  ${judged.toFixed(0)}`,
    `  bulkAdd, trusted:       ${trusted.toFixed(0)}`,
    `  refreshResults of the ${n} coupons alone (one dry weighing each): ${refresh.toFixed(0)}`,
  ].join('\n'),
);
await h.close();
