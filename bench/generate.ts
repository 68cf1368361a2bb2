import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { openDatabase, type Database_ } from '../server/db/client';
import { seedDemo } from '../server/seed';

// Grows a fresh DATA_DIR (the demo shop plus invented history) to about 100,000 coupons: 50 trials of
// 4 conditions, 200 runs of 500 coupons, 4 weighings and 2 checks per coupon (400k and 200k rows).
// Direct SQL in one transaction, because this is test data, not a record of anyone's work; the results
// table is then filled by the measurements module's rebuild (bench/run.ts times it).

export const SCALE = { trials: 50, runs: 200, couponsPerRun: 500 };
const HOUR = 3_600_000;
const DAY = 24 * HOUR;

export interface Generated {
  dir: string;
  file: string;
  coupons: number;
  weighings: number;
  checks: number;
  ms: number;
}

export function generate(dir = fs.mkdtempSync(path.join(os.tmpdir(), 'lumenbook-bench-'))): Generated {
  const started = performance.now();
  const file = path.join(dir, 'lumenbook.db');
  const database: Database_ = openDatabase(file);
  seedDemo(database, { bcryptCost: 4 });
  const db = database.sqlite;
  const speciesIds = (db.prepare('select id from species order by id limit 4').all() as { id: number }[]).map((r) => r.id);
  const resinIds = (db.prepare('select id from resins order by id limit 2').all() as { id: number }[]).map((r) => r.id);
  const lotIds = (db.prepare('select id from resin_lots order by id').all() as { id: number }[]).map((r) => r.id);
  const userId = (db.prepare("select id from users where email = 'tech@demo.test'").get() as { id: number }).id;
  const now = Date.now();
  const iso = (ms: number) => new Date(ms).toISOString();

  const insTrial = db.prepare("insert into trials (code, title, question, status, controls_per_species, created_by) values (?, ?, ?, 'running', 0, ?)");
  const insCond = db.prepare(
    'insert into trial_conditions (trial_id, species_id, resin_id, process_label, coupons_wanted, created_by) values (?, ?, ?, ?, ?, ?)',
  );
  const insRun = db.prepare('insert into runs (code, chamber, resin_lot_id, altitude_m, created_by) values (?, ?, ?, 0, ?)');
  const insStage = db.prepare('insert into run_stages (run_id, stage, started_at, ended_at, planned_minutes, created_by) values (?, ?, ?, ?, ?, ?)');
  const insCoupon = db.prepare("insert into coupons (tag, trial_id, condition_id, species_id, role, run_id, created_by) values (?, ?, ?, ?, 'treated', ?, ?)");
  const insW = db.prepare("insert into weighings (coupon_id, stage, mass_g, measured_at, source, created_by) values (?, ?, ?, ?, 'entry', ?)");
  const insDim = db.prepare(
    "insert into checks (coupon_id, kind, stage, measured_at, length_mm, width_mm, thickness_mm, source, created_by) values (?, 'dimension', 'dry', ?, 100, 25, ?, 'entry', ?)",
  );
  const insHard = db.prepare(
    "insert into checks (coupon_id, kind, stage, measured_at, hardness_value, hardness_scale, source, created_by) values (?, 'hardness', 'cured', ?, ?, 'shore-d', 'entry', ?)",
  );

  let coupons = 0;
  let weighings = 0;
  let checks = 0;
  db.transaction(() => {
    const conditions: { trialId: number; conditionId: number; speciesId: number }[][] = [];
    for (let t = 0; t < SCALE.trials; t++) {
      const trialId = Number(insTrial.run(`BT-${String(t).padStart(3, '0')}`, `Bench trial ${t}`, 'How does uptake vary at scale?', userId).lastInsertRowid);
      const cells: { trialId: number; conditionId: number; speciesId: number }[] = [];
      for (let c = 0; c < 4; c++) {
        const speciesId = speciesIds[c % speciesIds.length] as number;
        const conditionId = Number(insCond.run(trialId, speciesId, resinIds[c % resinIds.length], `bench process ${c}`, 500, userId).lastInsertRowid);
        cells.push({ trialId, conditionId, speciesId });
      }
      conditions.push(cells);
    }
    for (let r = 0; r < SCALE.runs; r++) {
      const runId = Number(insRun.run(`BR-${String(r).padStart(3, '0')}`, `Chamber ${r % 3}`, lotIds[r % lotIds.length] ?? null, userId).lastInsertRowid);
      // Most runs finished long ago; the last 30 finished within the month (some cured weighings still
      // owed), the last 10 are still in the drying stage.
      const start = r >= SCALE.runs - 10 ? now - 2 * DAY : r >= SCALE.runs - 40 ? now - (5 + (r % 20)) * DAY : now - (400 - r) * DAY;
      const drying = r >= SCALE.runs - 10;
      insStage.run(runId, 'drying', iso(start), drying ? null : iso(start + 24 * HOUR), 24 * 60, userId);
      if (!drying) {
        insStage.run(runId, 'vacuum', iso(start + 25 * HOUR), iso(start + 29 * HOUR), 240, userId);
        insStage.run(runId, 'soak', iso(start + 29 * HOUR), iso(start + 41 * HOUR), 720, userId);
        insStage.run(runId, 'cure', iso(start + 42 * HOUR), iso(start + 48 * HOUR), 360, userId);
      }
      const cells = conditions[r % SCALE.trials] as { trialId: number; conditionId: number; speciesId: number }[];
      for (let i = 0; i < SCALE.couponsPerRun; i++) {
        const cell = cells[i % cells.length] as { trialId: number; conditionId: number; speciesId: number };
        const id = Number(
          insCoupon.run(`BC-${r}-${String(i).padStart(3, '0')}`, cell.trialId, cell.conditionId, cell.speciesId, runId, userId).lastInsertRowid,
        );
        coupons++;
        const dry = 28 + ((i * 7919) % 1000) / 100;
        insW.run(id, 'drying-check', dry * 1.004, iso(start + 2 * HOUR), userId);
        insW.run(id, 'drying-check', dry, iso(start + 20 * HOUR), userId);
        weighings += 2;
        insDim.run(id, iso(start + 22 * HOUR), 12 + (i % 5) / 10, userId);
        checks++;
        if (drying) continue;
        insW.run(id, 'dry', dry, iso(start + 24 * HOUR), userId);
        insW.run(id, 'soaked', dry * 1.6, iso(start + 41.5 * HOUR), userId);
        weighings += 2;
        // A few coupons of the recent runs still wait for their cured weighing.
        if (r >= SCALE.runs - 40 && i % 10 === 0) continue;
        insW.run(id, 'cured', dry * 1.55, iso(start + 49 * HOUR), userId);
        insHard.run(id, iso(start + 50 * HOUR), 60 + (i % 15), userId);
        weighings++;
        checks++;
      }
    }
  })();
  database.close();
  return { dir, file, coupons, weighings, checks, ms: performance.now() - started };
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const g = generate(process.argv[2]);
  console.log(`${g.coupons} coupons, ${g.weighings} weighings, ${g.checks} checks in ${g.file} (${Math.round(g.ms)} ms)`);
}
