import type { Db } from '../../db/client';
import type { Role } from '../../../shared/constants/roles';
import { DEFAULT_CURE_WINDOW_C } from '../../../shared/schemas/reference';
import { HANDBOOK_SPECIES } from './handbook-species';
import * as repo from './reference.repo';
import { seedHandbookSpecies } from './reference.service';

/** The demo seeder's context, as the seed composition hands it over. */
interface DemoContext {
  tx: Db;
  userIds: Record<Role, number>;
  now: Date;
}

/** Reference seeder: the handbook species, whenever the species table is empty (demo or not). */
export function seedReferenceSpecies(db: Db): void {
  seedHandbookSpecies(db, HANDBOOK_SPECIES);
}

const DAY_MS = 24 * 3600 * 1000;
const daysBefore = (now: Date, days: number) => new Date(now.getTime() - days * DAY_MS).toISOString().slice(0, 10);

/** Demo resin names and lot codes, for the seeders of runs and coupons. */
export const DEMO_RESINS = { clear: 'Crystal Pane 90', dyed: 'Ember Pane 90 (dyed)' } as const;
export const DEMO_LOTS = {
  /** Clear, active, about six weeks old: the everyday lot. */
  clearCurrent: 'CP-D2601',
  /** Clear, active, within a few days of its shelf life: shows the warning. */
  clearOld: 'CP-D2512',
  /** Dyed, active, young. */
  dyedCurrent: 'EP-D2602',
  /** Clear, used up. */
  clearSpent: 'CP-D2503',
} as const;

/**
 * Invented demo reference data: a few shop-measured woods, two invented resins and four lots, dated
 * relative to the demo's "now". None of these numbers are measurements of anything real.
 */
export function seedReferenceDemo({ tx, userIds, now }: DemoContext): void {
  const tech = userIds.technician;
  const admin = userIds.admin;
  const demoSource = 'Demo: invented shop measurement (not real data)';
  const shopSpecies = [
    { commonName: 'Box elder burl, spalted', botanicalName: 'Acer negundo', measuredDensityKgM3: 455, measuredMoisturePct: 7 },
    { commonName: 'Buckeye burl', botanicalName: 'Aesculus flava', measuredDensityKgM3: 390, measuredMoisturePct: 8 },
    { commonName: 'Maple, spalted soft', botanicalName: 'Acer rubrum', measuredDensityKgM3: 505, measuredMoisturePct: 6 },
  ];
  for (const s of shopSpecies) {
    if (repo.findSpeciesByName(tx, s.commonName)) continue;
    repo.insertSpecies(tx, { ...s, source: demoSource, origin: 'shop-measured', notes: 'Demo data, invented for trying the app', createdBy: admin });
  }

  const kind = 'Methacrylate-type monomer blend, heat cure';
  const clear = repo.insertResin(tx, {
    name: DEMO_RESINS.clear,
    kind,
    liquidDensityGcm3: 1.05,
    curedDensityGcm3: 1.17,
    cureMinC: DEFAULT_CURE_WINDOW_C.min,
    cureMaxC: DEFAULT_CURE_WINDOW_C.max,
    shelfLifeDays: 365,
    notes: 'Demo resin, an invented shop name',
    createdBy: admin,
  });
  const dyed = repo.insertResin(tx, {
    name: DEMO_RESINS.dyed,
    kind: `${kind}, with an amber dye`,
    liquidDensityGcm3: 1.06,
    curedDensityGcm3: 1.18,
    cureMinC: DEFAULT_CURE_WINDOW_C.min,
    cureMaxC: DEFAULT_CURE_WINDOW_C.max,
    shelfLifeDays: 365,
    notes: 'Demo resin, an invented shop name',
    createdBy: admin,
  });

  const lots = [
    {
      resinId: clear.id,
      code: DEMO_LOTS.clearCurrent,
      activatedAt: daysBefore(now, 42),
      volumeMl: 3800,
      reuseCount: 3,
      status: 'active' as const,
      catalystNotes: 'Catalyst premixed by the supplier',
    },
    {
      resinId: clear.id,
      code: DEMO_LOTS.clearOld,
      activatedAt: daysBefore(now, 360),
      volumeMl: 2100,
      reuseCount: 9,
      status: 'active' as const,
      catalystNotes: 'Catalyst premixed by the supplier',
      notes: 'Drained back after every run; darkening',
    },
    {
      resinId: dyed.id,
      code: DEMO_LOTS.dyedCurrent,
      activatedAt: daysBefore(now, 18),
      volumeMl: 1900,
      reuseCount: 1,
      status: 'active' as const,
      dyeNotes: 'Amber dye, 2 mL per litre',
    },
    {
      resinId: clear.id,
      code: DEMO_LOTS.clearSpent,
      activatedAt: daysBefore(now, 420),
      volumeMl: 300,
      reuseCount: 14,
      status: 'spent' as const,
      notes: 'Used up',
    },
  ];
  for (const lot of lots) repo.insertLot(tx, { ...lot, createdBy: tech });
}
