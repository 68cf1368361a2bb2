import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { openDatabase } from '../../db/client';
import { seedDemo } from '../../seed';
import { createAnalysisService } from './analysis.service';
import { generatedShop } from './generated-shop';

/*
 * A held set of coupons is patched after a few writes to the results table instead of being read again
 * (analysis.service.ts). Whatever the write, the patched answers must equal those of a service that reads
 * everything afresh.
 */
const shop = generatedShop(600);
const sqlite = shop.database.sqlite;
afterAll(() => {
  shop.database.close();
  fs.rmSync(shop.dir, { recursive: true, force: true });
});

const [r1, r2] = shop.resinIds as [number, number];
const views = [{}, { speciesId: [shop.speciesId] }, { thicknessMinMm: 25 }, { from: '2020-01-03' }, { resinId: [r1] }, { speciesOrigin: 'handbook' as const }];
const service = () => createAnalysisService({ db: shop.database.db, now: () => new Date(0) });
// One held service per view, so each keeps its set from one write to the next (a service holds 3 sets).
// The resin view holds no control at all: a control's change must still refresh it.
const held = views.map(service);

function answers(s: ReturnType<typeof createAnalysisService>, filters: (typeof views)[number]) {
  return [
    s.overview(filters, 'measured'),
    s.overview(filters, 'handbook'),
    s.compare(filters, { resinId: r1 }, { resinId: r2 }, 'wpgPct'),
    s.compare(filters, { resinId: r1, speciesId: shop.speciesId }, { speciesId: shop.speciesId, role: 'control' }, 'hardness'),
    s.coupons(filters, 1, 1000),
  ];
}

const expectSameAsFresh = () => views.forEach((filters, i) => expect(answers(held[i]!, filters)).toEqual(answers(service(), filters)));
const treated = (k: number) =>
  sqlite.prepare("select coupon_id from coupon_results where role = 'treated' order by coupon_id limit 1 offset ?").pluck().get(k) as number;

describe('held coupons patched after writes', () => {
  it('start equal', () => {
    expectSameAsFresh();
  });

  it('after a treated coupon’s uptake is corrected (the same coupons, one changed in place)', () => {
    sqlite.prepare('update coupon_results set wpg_pct = wpg_pct + 30, hardness_cured_shore_d = 90 where coupon_id = ?').run(treated(3));
    expectSameAsFresh();
  });

  it('after a coupon moves to another species (it leaves one filtered set and joins another)', () => {
    const other = sqlite.prepare('select id from species where id <> ? and basic_sg is not null limit 1').pluck().get(shop.speciesId) as number;
    sqlite.prepare('update coupon_results set species_id = ? where coupon_id = ?').run(other, treated(0));
    sqlite.prepare('update coupon_results set species_id = ?, thickness_mm = 40 where coupon_id = ?').run(shop.speciesId, treated(5));
    expectSameAsFresh();
  });

  it('after a coupon comes in and another goes out', () => {
    const last = sqlite.prepare('select * from coupon_results where coupon_id = ?').get(treated(7)) as Record<string, unknown>;
    const id = Number(
      sqlite.prepare("insert into coupons (tag, species_id, role, source_board) values ('NEW-1', ?, 'treated', 'B-new')").run(last.species_id).lastInsertRowid,
    );
    const cols = Object.keys(last).filter((c) => c !== 'coupon_id' && c !== 'tag' && c !== 'source_board');
    sqlite
      .prepare(`insert into coupon_results (coupon_id, tag, source_board, ${cols.join(', ')}) values (?, 'NEW-1', 'B-new', ${cols.map(() => '?').join(', ')})`)
      .run(id, ...cols.map((c) => last[c]));
    sqlite.prepare('delete from coupon_results where coupon_id = ?').run(treated(9));
    expectSameAsFresh();
  });

  it('after a run’s cure date and code change (its coupons’ treated date and run code follow: they are read again)', () => {
    const run = sqlite.prepare('select run_id from coupon_results where coupon_id = ?').pluck().get(treated(2)) as number;
    sqlite.prepare("update run_stages set started_at = '2019-06-01T08:00:00.000Z' where run_id = ? and stage = 'cure'").run(run);
    sqlite.prepare("update runs set code = 'GR-moved' where id = ?").run(run);
    expectSameAsFresh();
  });

  it('after a control changes (hardness gain is worked out from it anew)', () => {
    sqlite
      .prepare("update coupon_results set hardness_dry_shore_d = 40 where coupon_id = (select min(coupon_id) from coupon_results where role = 'control')")
      .run();
    expectSameAsFresh();
  });

  it('after a write to a reference table (the rows are kept, names and reference values taken anew)', () => {
    sqlite.prepare('update resins set name = name || ?, cured_density_g_cm3 = 1.3 where id = ?').run(' (renamed)', r1);
    expectSameAsFresh();
    sqlite.prepare('update species set common_name = common_name || ?, basic_sg = basic_sg * 1.05 where id = ?').run(' (renamed)', shop.speciesId);
    expectSameAsFresh();
    // A species changes origin: it leaves the origin filter's set.
    sqlite.prepare("update species set origin = 'shop-measured' where id = ?").run(shop.speciesId);
    expectSameAsFresh();
  });
});

describe('held coupons patched after a control changes (the demo shop: trials, controls, ASE and WRE)', () => {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'lumenbook-patch-'));
  const demo = openDatabase(path.join(dir, 'demo.db'));
  seedDemo(demo);
  afterAll(() => {
    demo.close();
    fs.rmSync(dir, { recursive: true, force: true });
  });
  const q = demo.sqlite;
  const control = q
    .prepare(
      "select coupon_id as id, trial_id as trialId from coupon_results where role = 'control' and trial_id is not null and swelling_pct is not null limit 1",
    )
    .get() as { id: number; trialId: number };
  const resin = q
    .prepare("select resin_id from coupon_results where trial_id = ? and role = 'treated' and resin_id is not null limit 1")
    .pluck()
    .get(control.trialId) as number;
  // A resin view holds no control at all, a treated-only view neither: a control's change must still reach them.
  const demoViews = [{}, { resinId: [resin] }, { role: 'treated' as const }, { trialId: [control.trialId] }];
  const fresh = () => createAnalysisService({ db: demo.db, now: () => new Date(0) });
  const keep = demoViews.map(fresh);
  const same = () =>
    demoViews.forEach((filters, i) => {
      const a = keep[i]!;
      const b = fresh();
      expect([a.overview(filters, 'measured'), a.coupons(filters, 1, 1000)]).toEqual([b.overview(filters, 'measured'), b.coupons(filters, 1, 1000)]);
    });

  it('start equal, with ASE or WRE on the screen', () => {
    same();
    expect(keep[0]!.coupons({}, 1, 1000).items.some((c) => c.asePct !== null || c.wrePct !== null)).toBe(true);
  });

  it('after a control’s swelling is corrected (its trial’s treated coupons have a new ASE)', () => {
    q.prepare('update coupon_results set swelling_pct = swelling_pct * 3 + 5 where coupon_id = ?').run(control.id);
    same();
  });

  it('after a control becomes a treated coupon (it is no longer their reference)', () => {
    q.prepare("update coupon_results set role = 'treated' where coupon_id = ?").run(control.id);
    same();
  });
});
