import { sql } from 'drizzle-orm';
import { index, integer, real, sqliteTable, text } from 'drizzle-orm/sqlite-core';
import { COUPON_ROLES } from '../../../shared/constants/records';
import { MC_SOURCES, SWELLING_BASES, type CouponMetrics } from '../../../shared/coupons/metrics';
import { coupons } from './coupons';

/**
 * One row per coupon: its keys, its current readings per stage, and every metric of
 * shared/coupons/metrics.ts, computed by that same function. Written in the same transaction as each
 * measurement or key change by server/measurements, and rebuildable from the readings
 * (`npm run db:rebuild-results`). Lists, Bench and analysis read it instead of recomputing history.
 * No timestamps of its own, so a rebuild gives exactly the same rows as the incremental path.
 */
export const couponResults = sqliteTable(
  'coupon_results',
  {
    couponId: integer('coupon_id')
      .primaryKey()
      .references(() => coupons.id, { onDelete: 'cascade' }),
    // Keys.
    tag: text('tag').notNull(),
    trialId: integer('trial_id'),
    conditionId: integer('condition_id'),
    runId: integer('run_id'),
    speciesId: integer('species_id').notNull(),
    /** The resin the coupon went through (its run's lot), or the one its condition plans before a run. */
    resinId: integer('resin_id'),
    resinLotId: integer('resin_lot_id'),
    role: text('role', { enum: COUPON_ROLES }).notNull(),
    sourceBoard: text('source_board'),
    // Current readings, pivoted by stage (SI: g, mm, cm³, %).
    dryMassG: real('dry_mass_g'),
    soakedMassG: real('soaked_mass_g'),
    curedMassG: real('cured_mass_g'),
    wetTestMassG: real('wet_test_mass_g'),
    dryingCheckCount: integer('drying_check_count').notNull().default(0),
    firstDryingCheckMassG: real('first_drying_check_mass_g'),
    lastDryingCheckMassG: real('last_drying_check_mass_g'),
    lastDryingCheckAt: text('last_drying_check_at'),
    dryLengthMm: real('dry_length_mm'),
    dryWidthMm: real('dry_width_mm'),
    dryThicknessMm: real('dry_thickness_mm'),
    dryVolumeCm3: real('dry_volume_cm3'),
    curedVolumeCm3: real('cured_volume_cm3'),
    wetTestVolumeCm3: real('wet_test_volume_cm3'),
    /** A moisture meter reading at the dry stage, %. */
    dryMoisturePct: real('dry_moisture_pct'),
    /** Latest hardness per stage and scale; scales are different tests and are never converted. */
    hardnessDryShoreD: real('hardness_dry_shore_d'),
    hardnessDryJankaN: real('hardness_dry_janka_n'),
    hardnessDryBrinellHb: real('hardness_dry_brinell_hb'),
    hardnessCuredShoreD: real('hardness_cured_shore_d'),
    hardnessCuredJankaN: real('hardness_cured_janka_n'),
    hardnessCuredBrinellHb: real('hardness_cured_brinell_hb'),
    hardnessWetTestShoreD: real('hardness_wet_test_shore_d'),
    hardnessWetTestJankaN: real('hardness_wet_test_janka_n'),
    hardnessWetTestBrinellHb: real('hardness_wet_test_brinell_hb'),
    // Metrics (couponMetrics).
    thicknessMm: real('thickness_mm'),
    mcPct: real('mc_pct'),
    mcSource: text('mc_source', { enum: MC_SOURCES }),
    dryDensityKgM3: real('dry_density_kg_m3'),
    drySg: real('dry_sg'),
    wpgPct: real('wpg_pct'),
    wetUptakePct: real('wet_uptake_pct'),
    resinLoadingKgM3: real('resin_loading_kg_m3'),
    voidFillPct: real('void_fill_pct'),
    maxWpgPct: real('max_wpg_pct'),
    cureLossPct: real('cure_loss_pct'),
    bulkingPct: real('bulking_pct'),
    swellingPct: real('swelling_pct'),
    swellingBasis: text('swelling_basis', { enum: SWELLING_BASES }),
    /** The hardness list exactly as couponMetrics orders it. */
    hardness: text('hardness', { mode: 'json' }).$type<CouponMetrics['hardness']>().notNull(),
    /** Why a metric is blank although its readings are there: [{ metric, message }]. */
    problems: text('problems', { mode: 'json' }).$type<CouponMetrics['problems']>().notNull(),
    problemCount: integer('problem_count').notNull().default(0),
  },
  (t) => [
    index('coupon_results_trial_idx').on(t.trialId, t.conditionId),
    index('coupon_results_run_idx').on(t.runId),
    index('coupon_results_species_resin_idx').on(t.speciesId, t.resinId),
    index('coupon_results_resin_idx').on(t.resinId),
    index('coupon_results_lot_idx').on(t.resinLotId),
    index('coupon_results_role_idx').on(t.role, t.speciesId),
    // Coupons still waiting for a weighing, per run, in tag order (Bench's counts and first few): partial
    // indexes hold only the waiting rows, so the count no longer visits every coupon of every open run
    // (300 ms at 100k coupons, 1 ms with the index).
    index('coupon_results_dry_waiting_idx')
      .on(t.runId, t.tag)
      .where(sql`dry_mass_g is null`),
    index('coupon_results_soaked_waiting_idx')
      .on(t.runId, t.role, t.tag)
      .where(sql`soaked_mass_g is null`),
    index('coupon_results_cured_waiting_idx')
      .on(t.runId, t.role, t.tag)
      .where(sql`cured_mass_g is null`),
  ],
);

export type CouponResultRow = typeof couponResults.$inferSelect;
export type CouponResultValues = typeof couponResults.$inferInsert;
