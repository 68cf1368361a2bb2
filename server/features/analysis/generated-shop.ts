import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { openDatabase, type Database_ } from '../../db/client';
import { seedReference } from '../../seed';

// A deterministic pseudo-random stream (Park–Miller minimal standard), so every run times the same data.
function stream(seed: number): () => number {
  let s = seed;
  return () => {
    s = (s * 16807) % 2147483647;
    return s / 2147483647;
  };
}

/**
 * A generated shop with n coupons written straight into the coupons and coupon_results tables (the
 * analysis reads nothing else per coupon): every handbook species, four resins, one coupon in ten a
 * control, boards of three coupons, WPG falling with SG and thickness, a few coupons without a cure, and
 * the treated coupons in runs of a hundred, one run a day (soaked, then cured the next day).
 */
export function generatedShop(n: number): { database: Database_; dir: string; resinIds: number[]; speciesId: number } {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'lumenbook-bench-'));
  const database = openDatabase(path.join(dir, 'bench.db'));
  seedReference(database);
  return { database, dir, ...addGeneratedCoupons(database, n) };
}

/** The generated coupons (see generatedShop) added to a database that already holds the reference data. */
export function addGeneratedCoupons(database: Database_, n: number): { resinIds: number[]; speciesId: number } {
  const s = database.sqlite;
  const species = s.prepare('select id, basic_sg as sg from species where basic_sg is not null order by id').all() as { id: number; sg: number }[];
  const insResin = s.prepare("insert into resins (name, kind, liquid_density_g_cm3, cured_density_g_cm3) values (?, 'methacrylate', 1.02, ?)");
  const resinIds = [0, 1, 2, 3].map((i) => Number(insResin.run(`Bench resin ${i + 1}`, 1.1 + 0.03 * i).lastInsertRowid));
  const next = stream(7);
  const insRun = s.prepare("insert into runs (code, chamber, altitude_m) values (?, 'Bench chamber', 100)");
  const insStage = s.prepare('insert into run_stages (run_id, stage, started_at) values (?, ?, ?)');
  const runIds: number[] = [];
  const runOf = (i: number): number => {
    const k = Math.floor(i / 100);
    if (runIds[k] === undefined) {
      const id = Number(insRun.run(`GR-${String(k).padStart(5, '0')}`).lastInsertRowid);
      const day = new Date(Date.UTC(2020, 0, 1) + k * 86_400_000);
      insStage.run(id, 'soak', day.toISOString());
      insStage.run(id, 'cure', new Date(day.getTime() + 86_400_000).toISOString());
      runIds[k] = id;
    }
    return runIds[k] as number;
  };
  const insCoupon = s.prepare('insert into coupons (tag, species_id, role, source_board) values (?, ?, ?, ?)');
  const insResult = s.prepare(
    `insert into coupon_results (coupon_id, run_id, tag, species_id, resin_id, role, source_board, dry_mass_g, cured_mass_g, thickness_mm, dry_sg, wpg_pct,
       resin_loading_kg_m3, void_fill_pct, max_wpg_pct, swelling_pct, swelling_basis, hardness_cured_shore_d, hardness_dry_shore_d, hardness, problems, problem_count)
     values (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, '[]', '[]', 0)`,
  );
  s.transaction(() => {
    for (let i = 0; i < n; i++) {
      const sp = species[i % species.length]!;
      const role = i % 10 === 9 ? 'control' : 'treated';
      const board = `B${Math.floor(i / 3)}`;
      const tag = `G-${String(i).padStart(6, '0')}`;
      const id = Number(insCoupon.run(tag, sp.id, role, board).lastInsertRowid);
      const sg = Math.max(0.2, Math.min(1.2, (sp.sg / (1 - 0.265 * sp.sg)) * (0.9 + 0.2 * next())));
      const thickness = 10 + 40 * next();
      const resinDensity = 1.1 + 0.03 * (i % 4);
      const maxWpg = (1 / sg - 1 / 1.5) * resinDensity * 100;
      const treated = role === 'treated';
      const cured = treated && next() > 0.02;
      const wpg = cured ? Math.max(1, maxWpg * (0.55 + 0.1 * next()) - 0.2 * thickness) : null;
      const dry = 20 + 10 * next();
      insResult.run(
        id,
        treated ? runOf(i) : null,
        tag,
        sp.id,
        treated ? resinIds[i % 4]! : null,
        role,
        board,
        dry,
        wpg === null ? null : dry * (1 + wpg / 100),
        thickness,
        sg,
        wpg,
        wpg === null ? null : (wpg / 100) * sg * 1000,
        wpg === null ? null : (wpg / maxWpg) * 100,
        maxWpg,
        treated ? 2 + 3 * next() : 10 + 4 * next(),
        'volume',
        treated ? 70 + 5 * next() : null,
        treated ? null : 55 + 5 * next(),
      );
    }
  })();
  return { resinIds, speciesId: species[0]!.id };
}
