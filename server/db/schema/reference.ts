import { index, integer, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';
import { LOT_STATUSES, SPECIES_ORIGINS } from '../../../shared/constants/records';
import { users } from './auth';
import { createdAt, createdBy, id } from './columns';

/**
 * A wood (or other porous material). Handbook rows carry the published values and their citation;
 * shop-measured rows (burls, spalted, exotics) carry the shop's own measured density.
 */
export const species = sqliteTable(
  'species',
  {
    id: id(),
    commonName: text('common_name').notNull(),
    botanicalName: text('botanical_name').notNull(),
    /** Oven-dry mass over green volume. */
    basicSg: real('basic_sg'),
    /** Oven-dry mass over volume at 12 % MC. */
    sg12: real('sg_12'),
    /** Side hardness at 12 % MC, newtons (ASTM D143 ball test). */
    sideHardnessN: real('side_hardness_n'),
    /** Shop-measured: density (kg/m³) at the stated moisture content. */
    measuredDensityKgM3: real('measured_density_kg_m3'),
    measuredMoisturePct: real('measured_moisture_pct'),
    /** Coefficient of variation of SG for the plausibility check, when a source gives one (fraction). */
    sgCoefficientOfVariation: real('sg_cov'),
    source: text('source').notNull(),
    origin: text('origin', { enum: SPECIES_ORIGINS }).notNull(),
    notes: text('notes'),
    createdAt: createdAt(),
    createdBy: createdBy().references(() => users.id),
  },
  (t) => [uniqueIndex('species_common_name_unique').on(t.commonName), index('species_origin_idx').on(t.origin)],
);

/** A resin product as the shop names it. */
export const resins = sqliteTable(
  'resins',
  {
    id: id(),
    name: text('name').notNull(),
    kind: text('kind').notNull(),
    liquidDensityGcm3: real('liquid_density_g_cm3').notNull(),
    curedDensityGcm3: real('cured_density_g_cm3').notNull(),
    cureMinC: real('cure_min_c').notNull().default(93),
    cureMaxC: real('cure_max_c').notNull().default(121),
    shelfLifeDays: integer('shelf_life_days').notNull().default(365),
    notes: text('notes'),
    createdAt: createdAt(),
    createdBy: createdBy().references(() => users.id),
  },
  (t) => [uniqueIndex('resins_name_unique').on(t.name)],
);

/** One activated batch of a resin. */
export const resinLots = sqliteTable(
  'resin_lots',
  {
    id: id(),
    resinId: integer('resin_id')
      .notNull()
      .references(() => resins.id),
    code: text('code').notNull(),
    activatedAt: text('activated_at').notNull(),
    catalystNotes: text('catalyst_notes'),
    dyeNotes: text('dye_notes'),
    volumeMl: real('volume_ml').notNull(),
    reuseCount: integer('reuse_count').notNull().default(0),
    status: text('status', { enum: LOT_STATUSES }).notNull().default('active'),
    notes: text('notes'),
    createdAt: createdAt(),
    createdBy: createdBy().references(() => users.id),
  },
  (t) => [uniqueIndex('resin_lots_code_unique').on(t.code), index('resin_lots_resin_idx').on(t.resinId), index('resin_lots_status_idx').on(t.status)],
);
