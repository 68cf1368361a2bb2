import { index, integer, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';
import { TRIAL_STATUSES } from '../../../shared/constants/records';
import { users } from './auth';
import { createdAt, createdBy, id } from './columns';
import { resins, species } from './reference';

/** A planned comparison that can answer a question. */
export const trials = sqliteTable(
  'trials',
  {
    id: id(),
    code: text('code').notNull(),
    title: text('title').notNull(),
    question: text('question').notNull(),
    status: text('status', { enum: TRIAL_STATUSES }).notNull().default('planning'),
    /** Untreated controls planned per species in the trial. */
    controlsPerSpecies: integer('controls_per_species').notNull().default(2),
    notes: text('notes'),
    createdAt: createdAt(),
    createdBy: createdBy().references(() => users.id),
  },
  (t) => [uniqueIndex('trials_code_unique').on(t.code), index('trials_status_idx').on(t.status)],
);

/** One cell of the trial's grid: species × resin × process settings, with the coupons wanted. */
export const trialConditions = sqliteTable(
  'trial_conditions',
  {
    id: id(),
    trialId: integer('trial_id')
      .notNull()
      .references(() => trials.id, { onDelete: 'cascade' }),
    speciesId: integer('species_id')
      .notNull()
      .references(() => species.id),
    resinId: integer('resin_id')
      .notNull()
      .references(() => resins.id),
    /** A short name for the process settings, e.g. "4 h vacuum, overnight soak". */
    processLabel: text('process_label').notNull(),
    vacuumMinutes: integer('vacuum_minutes'),
    soakMinutes: integer('soak_minutes'),
    cureTempC: real('cure_temp_c'),
    cureMinutes: integer('cure_minutes'),
    /** Nominal coupon thickness for this cell, mm (uptake depends on it). */
    thicknessMm: real('thickness_mm'),
    couponsWanted: integer('coupons_wanted').notNull(),
    createdAt: createdAt(),
    createdBy: createdBy().references(() => users.id),
  },
  (t) => [
    index('trial_conditions_trial_idx').on(t.trialId),
    index('trial_conditions_species_idx').on(t.speciesId),
    index('trial_conditions_resin_idx').on(t.resinId),
  ],
);
