import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, bench, describe } from 'vitest';
import { openDatabase } from '../db/client';
import { species } from '../db/schema/reference';
import { seedDemo } from '../seed';
import { createMeasurements, type MeasurementEntry } from './measurements';
import { refreshResults } from './results';

// The two everyday writes through the measurements module, each in its own transaction as the routes
// run them: one reading with its results row (the coupon page), and the entry grid's save of 500 full
// rows (a dry weighing, dry dimensions and a meter moisture per coupon). Targets on the shared 2-core
// machine: one write ≤ 5 ms median, the 500-row batch ≤ 1 s. The database holds 20,000 other coupons
// with readings, so the indexes have some depth. Results: bench/imports-results.md.

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'lumenbook-writes-'));
const d = openDatabase(path.join(dir, 'writes.db'));
seedDemo(d, { bcryptCost: 4 });
const actor = d.sqlite.prepare("select id from users where email = 'tech@demo.test'").get() as { id: number };
const sp = d.db.select({ id: species.id }).from(species).limit(1).get()!.id;
const m = createMeasurements({ now: () => new Date() });

function coupons(n: number, prefix: string): number[] {
  const ins = d.sqlite.prepare("insert into coupons (tag, species_id, role) values (?, ?, 'treated')");
  const ids: number[] = [];
  d.db.transaction((tx) => {
    for (let i = 0; i < n; i++) ids.push(Number(ins.run(`${prefix}-${i}`, sp).lastInsertRowid));
    refreshResults(tx, ids);
  });
  return ids;
}

const at = (i: number) => new Date(Date.UTC(2026, 2, 2) + i * 1000).toISOString();
const others = coupons(20_000, 'OTHER');
d.db.transaction((tx) =>
  m.bulkAdd(
    tx,
    actor,
    'entry',
    others.map((couponId, i) => ({ couponId, weighings: [{ stage: 'dry', massG: 10 + (i % 50) / 10, measuredAt: at(i) }] })),
  ),
);

const singles = coupons(5_000, 'SINGLE');
let next = 0;
const singleTimes: number[] = [];
const batchTimes: number[] = [];
const gridRow = (couponId: number, i: number): MeasurementEntry => ({
  couponId,
  weighings: [{ stage: 'dry', massG: 12 + (i % 30) / 10, measuredAt: at(i) }],
  checks: [
    { kind: 'dimension', stage: 'dry', measuredAt: at(i), lengthMm: 100, widthMm: 25, thicknessMm: 25 },
    { kind: 'moisture', stage: 'dry', measuredAt: at(i), moisturePct: 8 + (i % 5) },
  ],
});

describe('measurement writes', () => {
  bench(
    'one weighing with its results row',
    () => {
      const couponId = singles[next++ % singles.length] as number;
      const t0 = performance.now();
      d.db.transaction((tx) => m.addWeighing(tx, actor, 'entry', couponId, { stage: 'drying-check', massG: 11.5, measuredAt: at(next) }));
      singleTimes.push(performance.now() - t0);
    },
    { iterations: 1000, time: 0, warmupIterations: 20 },
  );

  bench(
    'grid batch of 500 full rows',
    () => {
      const ids = coupons(500, `GRID-${batchTimes.length}-${Math.random()}`);
      const t0 = performance.now();
      d.db.transaction((tx) => m.batch(tx, actor, 'grid', ids.map(gridRow)));
      batchTimes.push(performance.now() - t0);
    },
    { iterations: 10, time: 0, warmupIterations: 1 },
  );
});

afterAll(() => {
  const q = (xs: number[], p: number) => [...xs].sort((a, b) => a - b)[Math.min(xs.length - 1, Math.floor(xs.length * p))] ?? NaN;
  console.log(
    [
      'measurement writes:',
      `  one weighing with its results row: median ${q(singleTimes, 0.5).toFixed(2)} ms, p99 ${q(singleTimes, 0.99).toFixed(2)} ms (${singleTimes.length} writes)`,
      `  grid batch of 500 full rows (1,500 readings): median ${q(batchTimes, 0.5).toFixed(0)} ms, max ${Math.max(...batchTimes).toFixed(0)} ms (${batchTimes.length} batches)`,
    ].join('\n'),
  );
  d.close();
  fs.rmSync(dir, { recursive: true, force: true });
});
