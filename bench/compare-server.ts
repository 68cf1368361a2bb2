/**
 * What the Compare screen's answers cost the server over 10,000 and 100,000 generated coupons.
 *
 *   npx tsx bench/compare-server.ts [runs=15]
 *
 * For each size (server/features/analysis/generated-shop.ts) it times, as CPU time of this process
 * (process.cpuUsage, less swayed by other load than the wall clock), the two requests the screen makes —
 * the summary (species × resin table, both fits, outliers, plot data) and one two-group test:
 *
 * - first view: a new service, nothing held — every coupon is read from the results table;
 * - after a write: one results row rewritten before each view — the usual case (a weighing entered, a
 *   reading corrected): the held coupons are patched and every number computed afresh;
 * - after a species edit: one species row rewritten before each view — the held coupons are kept and take
 *   the new names and reference values;
 * - repeated view: data unchanged, the answers come from the cache after a version check.
 *
 * Writes the medians into bench/compare-results.md (the "server" section), with the machine's load.
 */
import fs from 'node:fs';
import os from 'node:os';
import { execSync } from 'node:child_process';
import { createAnalysisService } from '../server/features/analysis/analysis.service';
import { generatedShop } from '../server/features/analysis/generated-shop';
import { writeSection } from './results-file';

const runs = Number(process.argv[2] ?? 15);
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)] as number;
const cpuMs = (f: () => void) => {
  const c0 = process.cpuUsage();
  f();
  const c = process.cpuUsage(c0);
  return (c.user + c.system) / 1000;
};

type Row = {
  n: number;
  first: number;
  firstOverview: number;
  afterWrite: number;
  afterWriteOverview: number;
  afterWriteCompare: number;
  afterSpecies: number;
  warm: number;
};
const rows: Row[] = [];
for (const n of [10_000, 100_000]) {
  const shop = generatedShop(n);
  const db = shop.database.db;
  const [r1, r2] = shop.resinIds as [number, number];
  const touch = shop.database.sqlite.prepare('update coupon_results set wpg_pct = wpg_pct where coupon_id = (select min(coupon_id) from coupon_results)');
  const touchSpecies = shop.database.sqlite.prepare('update species set common_name = common_name where id = ?');
  const first: number[] = [];
  const firstOverview: number[] = [];
  for (let i = 0; i < Math.max(3, Math.round(runs / 3)); i++) {
    const service = createAnalysisService({ db, now: () => new Date() });
    let o = 0;
    first.push(
      cpuMs(() => {
        o = cpuMs(() => service.overview({}, 'measured'));
        service.compare({}, { resinId: r1 }, { resinId: r2 }, 'wpgPct');
      }),
    );
    firstOverview.push(o);
  }
  const service = createAnalysisService({ db, now: () => new Date() });
  service.overview({}, 'measured');
  const afterWrite: number[] = [];
  const afterWriteOverview: number[] = [];
  const afterWriteCompare: number[] = [];
  for (let i = 0; i < runs; i++) {
    touch.run();
    let o = 0;
    let c = 0;
    afterWrite.push(
      cpuMs(() => {
        o = cpuMs(() => service.overview({}, 'measured'));
        c = cpuMs(() => service.compare({}, { resinId: r1 }, { resinId: r2 }, 'wpgPct'));
      }),
    );
    afterWriteOverview.push(o);
    afterWriteCompare.push(c);
  }
  const afterSpecies: number[] = [];
  for (let i = 0; i < runs; i++) {
    touchSpecies.run(shop.speciesId);
    afterSpecies.push(
      cpuMs(() => {
        service.overview({}, 'measured');
        service.compare({}, { resinId: r1 }, { resinId: r2 }, 'wpgPct');
      }),
    );
  }
  const warm: number[] = [];
  for (let i = 0; i < runs; i++)
    warm.push(
      cpuMs(() => {
        service.overview({}, 'measured');
        service.compare({}, { resinId: r1 }, { resinId: r2 }, 'wpgPct');
      }),
    );
  const row = {
    n,
    first: median(first),
    firstOverview: median(firstOverview),
    afterWrite: median(afterWrite),
    afterWriteOverview: median(afterWriteOverview),
    afterWriteCompare: median(afterWriteCompare),
    afterSpecies: median(afterSpecies),
    warm: median(warm),
  };
  rows.push(row);
  console.log(
    `${n} coupons: first view ${row.first.toFixed(0)} ms (summary ${row.firstOverview.toFixed(0)}), after a write ${row.afterWrite.toFixed(0)} ms ` +
      `(summary ${row.afterWriteOverview.toFixed(0)}, test ${row.afterWriteCompare.toFixed(0)}), after a species edit ${row.afterSpecies.toFixed(0)} ms, ` +
      `repeated ${row.warm.toFixed(2)} ms`,
  );
  shop.database.close();
  fs.rmSync(shop.dir, { recursive: true, force: true });
}

const [small, large] = rows as [Row, Row];
const uptime = execSync('uptime').toString().trim();
const f = (v: number) => v.toFixed(0);
writeSection(
  'server',
  [
    `Server: summary by species × resin (table, both fits, outliers, plot data) plus one two-group test, CPU time of the process, median of ${runs}`,
    `(first view: ${Math.max(3, Math.round(runs / 3))}). \`npx tsx bench/compare-server.ts\`, ${new Date().toISOString().slice(0, 16)}Z, ${os.cpus().length} cores, \`${uptime}\`.`,
    '',
    '| coupons | first view (nothing held) | of which summary | after a one-row write | of which summary | of which two-group test | after a species edit | repeated view |',
    '|---|---|---|---|---|---|---|---|',
    ...rows.map(
      (r) =>
        `| ${r.n.toLocaleString('en')} | ${f(r.first)} ms | ${f(r.firstOverview)} ms | ${f(r.afterWrite)} ms | ${f(r.afterWriteOverview)} ms | ${f(r.afterWriteCompare)} ms | ${f(r.afterSpecies)} ms | ${r.warm.toFixed(2)} ms |`,
    ),
    '',
    `Growth from 10k to 100k: first view ${(large.first / small.first).toFixed(1)}×, after a write ${(large.afterWrite / small.afterWrite).toFixed(1)}× (target ≤ 11×).`,
    'Target ≤ 300 ms at 100k (stretch 150 ms). The first view after a start (or after another connection wrote) reads every coupon once;',
    'after a one-row write or a species/resin edit the held coupons are patched.',
  ].join('\n'),
);
