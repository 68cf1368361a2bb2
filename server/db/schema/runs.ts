import { index, integer, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';
import { GAUGE_UNITS, RUN_STAGES } from '../../../shared/constants/records';
import { users } from './auth';
import { createdAt, createdBy, id } from './columns';
import { resinLots } from './reference';

/** One chamber cycle. Stage times and readings are in run_stages / run_readings. */
export const runs = sqliteTable(
  'runs',
  {
    id: id(),
    code: text('code').notNull(),
    chamber: text('chamber').notNull(),
    resinLotId: integer('resin_lot_id').references(() => resinLots.id),
    /** Shop altitude when the run was made, metres; fixes the ambient pressure for the gauge arithmetic. */
    altitudeM: real('altitude_m').notNull(),
    notes: text('notes'),
    createdAt: createdAt(),
    createdBy: createdBy().references(() => users.id),
  },
  (t) => [uniqueIndex('runs_code_unique').on(t.code), index('runs_lot_idx').on(t.resinLotId)],
);

export const runStages = sqliteTable(
  'run_stages',
  {
    id: id(),
    runId: integer('run_id')
      .notNull()
      .references(() => runs.id, { onDelete: 'cascade' }),
    stage: text('stage', { enum: RUN_STAGES }).notNull(),
    startedAt: text('started_at').notNull(),
    endedAt: text('ended_at'),
    /** Planned length, minutes, so the bench can say when the stage is due to end. */
    plannedMinutes: integer('planned_minutes'),
    /** Vacuum stage: when bubbling stopped. */
    bubblingStoppedAt: text('bubbling_stopped_at'),
    /**
     * Vacuum stage: the shop's barometer (station pressure, kPa) while the gauge was read, when it has one.
     * It takes the place of the standard atmosphere at the run's altitude for this stage's readings.
     */
    barometerKpa: real('barometer_kpa'),
    /** Cure (and drying) stage: oven set point and the separate thermometer's reading, °C. */
    ovenSetC: real('oven_set_c'),
    ovenMeasuredC: real('oven_measured_c'),
    notes: text('notes'),
    createdAt: createdAt(),
    createdBy: createdBy().references(() => users.id),
  },
  (t) => [uniqueIndex('run_stages_run_stage_unique').on(t.runId, t.stage), index('run_stages_run_idx').on(t.runId)],
);

/** A vacuum gauge reading as the gauge shows it, with the absolute pressure worked out at entry. */
export const runReadings = sqliteTable(
  'run_readings',
  {
    id: id(),
    runId: integer('run_id')
      .notNull()
      .references(() => runs.id, { onDelete: 'cascade' }),
    stage: text('stage', { enum: RUN_STAGES }).notNull(),
    at: text('at').notNull(),
    gaugeValue: real('gauge_value').notNull(),
    gaugeUnit: text('gauge_unit', { enum: GAUGE_UNITS }).notNull(),
    absoluteKpa: real('absolute_kpa').notNull(),
    percentVacuum: real('percent_vacuum').notNull(),
    createdAt: createdAt(),
    createdBy: createdBy().references(() => users.id),
  },
  (t) => [index('run_readings_run_idx').on(t.runId)],
);

/**
 * A stage as it was before a correction replaced it: its values and gauge readings, with the reason.
 * `run_stages` and `run_readings` hold the current version; every earlier one stays here, so a
 * corrected time, reading or temperature is never lost.
 */
export const runStageVersions = sqliteTable(
  'run_stage_versions',
  {
    id: id(),
    runId: integer('run_id')
      .notNull()
      .references(() => runs.id, { onDelete: 'cascade' }),
    stageId: integer('stage_id').notNull(),
    stage: text('stage', { enum: RUN_STAGES }).notNull(),
    /** The stage row's values as they were (times, planned length, bubbling, oven temperatures, notes). */
    values: text('values', { mode: 'json' }).$type<Record<string, unknown>>().notNull(),
    /** Its gauge readings as they were. */
    readings: text('readings', { mode: 'json' }).$type<Record<string, unknown>[]>().notNull(),
    reason: text('reason').notNull(),
    /** When the correction replaced this version, and (created_by) who made it. */
    createdAt: createdAt(),
    createdBy: createdBy().references(() => users.id),
  },
  (t) => [index('run_stage_versions_run_idx').on(t.runId, t.stage)],
);
