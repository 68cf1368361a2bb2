import { eq } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { coupons } from '../../db/schema/coupons';
import { resins, species } from '../../db/schema/reference';
import { trialConditions, trials } from '../../db/schema/trials';
import type { Role } from '../../../shared/constants/roles';
import { createTrialsService } from './trials.service';

interface DemoContext {
  tx: Db;
  userIds: Record<Role, number>;
  now: Date;
}

/**
 * The demo's main trial, coupons created. Its code is fixed so the runs and coupons demo seeders can
 * find its coupons (see demoTrialCoupons): 3 species × 2 resins × 4 treated coupons, and 2 controls
 * per species, 30 coupons in all.
 */
export const DEMO_TRIAL_CODE = 'T26-001';
/** A second demo trial still being planned, whose warnings show what a weak plan looks like. */
export const DEMO_PLANNING_TRIAL_CODE = 'T26-002';

/** The coupons of the demo trial (by code), with their condition's resin, for the next seeders. */
export function demoTrialCoupons(tx: Db, code: string = DEMO_TRIAL_CODE) {
  const trial = tx.select().from(trials).where(eq(trials.code, code)).get();
  if (!trial) return [];
  return tx
    .select({
      id: coupons.id,
      tag: coupons.tag,
      role: coupons.role,
      speciesId: coupons.speciesId,
      conditionId: coupons.conditionId,
      speciesName: species.commonName,
      resinId: trialConditions.resinId,
    })
    .from(coupons)
    .innerJoin(species, eq(species.id, coupons.speciesId))
    .leftJoin(trialConditions, eq(trialConditions.id, coupons.conditionId))
    .where(eq(coupons.trialId, trial.id))
    .orderBy(coupons.id)
    .all();
}

function speciesId(tx: Db, commonName: string): number {
  const row = tx.select({ id: species.id }).from(species).where(eq(species.commonName, commonName)).get();
  if (!row) throw new Error(`demo seed: species "${commonName}" is missing`);
  return row.id;
}
function resinId(tx: Db, name: string): number {
  const row = tx.select({ id: resins.id }).from(resins).where(eq(resins.name, name)).get();
  if (!row) throw new Error(`demo seed: resin "${name}" is missing (the reference demo seeder runs first)`);
  return row.id;
}

/** Invented demo trials; runs after the reference demo seeder, which writes the resins. */
export function seedTrialsDemo({ tx, userIds, now }: DemoContext, resinNames: { clear: string; dyed: string }): void {
  // The demo's "now" fixes the year of the codes; the demo's codes are spelled out above, so set them.
  const service = createTrialsService({ db: tx, now: () => now, appUrl: '' });
  const tech = { id: userIds.technician };
  const clear = resinId(tx, resinNames.clear);
  const dyed = resinId(tx, resinNames.dyed);
  const process = { processLabel: '4 h vacuum, overnight soak', vacuumMinutes: 240, soakMinutes: 720, cureTempC: 107, cureMinutes: 150, thicknessMm: 20 };

  const main = service.createTrial(tech, {
    title: 'Dyed and clear blend in soft maples and buckeye',
    question: 'Do soft maples and buckeye take up the dyed blend as well as the clear one, under the same vacuum, soak and cure?',
    controlsPerSpecies: 2,
    notes: 'Demo trial, invented for trying the app.',
    conditions: ['Maple, red', 'Maple, silver', 'Buckeye, yellow'].flatMap((name) =>
      [clear, dyed].map((r) => ({ ...process, speciesId: speciesId(tx, name), resinId: r, couponsWanted: 4 })),
    ),
  });
  tx.update(trials).set({ code: DEMO_TRIAL_CODE, status: 'running' }).where(eq(trials.id, main.id)).run();
  service.createPlannedCoupons(tech, main.id);

  const planning = service.createTrial(tech, {
    title: 'Soak length in spalted box elder burl',
    question: 'Does a 24 h soak raise uptake over an 8 h soak in spalted box elder burl?',
    controlsPerSpecies: 0,
    notes: 'Demo trial still being planned: its warnings show what the plan lacks.',
    conditions: [
      { processLabel: '4 h vacuum, 8 h soak', vacuumMinutes: 240, soakMinutes: 480, cureTempC: 107, cureMinutes: 180, thicknessMm: 25, couponsWanted: 4 },
      { processLabel: '4 h vacuum, 24 h soak', vacuumMinutes: 240, soakMinutes: 1440, cureTempC: 107, cureMinutes: 180, thicknessMm: 25, couponsWanted: 2 },
    ].map((c) => ({ ...c, speciesId: speciesId(tx, 'Box elder burl, spalted'), resinId: clear })),
  });
  tx.update(trials).set({ code: DEMO_PLANNING_TRIAL_CODE }).where(eq(trials.id, planning.id)).run();
}
