import { index, integer, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';
import {
  CHECK_KINDS,
  CHECK_STAGES,
  COUPON_ROLES,
  HARDNESS_SCALES,
  PHOTO_KINDS,
  WEIGHING_STAGES,
  type MeasurementSource,
} from '../../../shared/constants/records';
import { users } from './auth';
import { createdAt, createdBy, id } from './columns';
import { species } from './reference';
import { runs } from './runs';
import { trialConditions, trials } from './trials';

/** One test specimen. */
export const coupons = sqliteTable(
  'coupons',
  {
    id: id(),
    tag: text('tag').notNull(),
    trialId: integer('trial_id').references(() => trials.id),
    /** Null for control coupons, which belong to the trial and species but to no treated cell. */
    conditionId: integer('condition_id').references(() => trialConditions.id),
    speciesId: integer('species_id')
      .notNull()
      .references(() => species.id),
    role: text('role', { enum: COUPON_ROLES }).notNull(),
    sourceBoard: text('source_board'),
    runId: integer('run_id').references(() => runs.id),
    notes: text('notes'),
    /** Bumped by every edit of the coupon's own fields; an edit names the version it was made on (409 when stale). */
    version: integer('version').notNull().default(1),
    createdAt: createdAt(),
    createdBy: createdBy().references(() => users.id),
  },
  (t) => [
    uniqueIndex('coupons_tag_unique').on(t.tag),
    index('coupons_trial_idx').on(t.trialId),
    index('coupons_condition_idx').on(t.conditionId),
    index('coupons_species_idx').on(t.speciesId),
    index('coupons_run_idx').on(t.runId),
    // The list's orders and filters, so a page far down is read from an index instead of sorting 100k rows.
    index('coupons_created_idx').on(t.createdAt, t.id),
    index('coupons_trial_tag_idx').on(t.trialId, t.tag),
    index('coupons_run_tag_idx').on(t.runId, t.tag),
  ],
);

/**
 * A mass reading. A correction never overwrites: it inserts a new row and points the old one at it
 * through superseded_by, so the history stays and the audit log says why.
 */
export const weighings = sqliteTable(
  'weighings',
  {
    id: id(),
    couponId: integer('coupon_id')
      .notNull()
      .references(() => coupons.id),
    stage: text('stage', { enum: WEIGHING_STAGES }).notNull(),
    massG: real('mass_g').notNull(),
    measuredAt: text('measured_at').notNull(),
    /** The CSV import that produced this reading, if any. */
    importId: integer('import_id'),
    /** entry | grid | import:<id> | correction (MeasurementSource). */
    source: text('source').$type<MeasurementSource>().notNull().default('entry'),
    supersededBy: integer('superseded_by'),
    deletedAt: text('deleted_at'),
    createdAt: createdAt(),
    createdBy: createdBy().references(() => users.id),
  },
  (t) => [index('weighings_coupon_idx').on(t.couponId, t.stage), index('weighings_import_idx').on(t.importId)],
);

/** A dimension, hardness or moisture reading. Hardness keeps its scale and is never converted. */
export const checks = sqliteTable(
  'checks',
  {
    id: id(),
    couponId: integer('coupon_id')
      .notNull()
      .references(() => coupons.id),
    kind: text('kind', { enum: CHECK_KINDS }).notNull(),
    stage: text('stage', { enum: CHECK_STAGES }).notNull(),
    measuredAt: text('measured_at').notNull(),
    lengthMm: real('length_mm'),
    widthMm: real('width_mm'),
    thicknessMm: real('thickness_mm'),
    /** Volume by immersion (cm³) when measured that way instead of by calipers. */
    volumeCm3: real('volume_cm3'),
    hardnessValue: real('hardness_value'),
    hardnessScale: text('hardness_scale', { enum: HARDNESS_SCALES }),
    moisturePct: real('moisture_pct'),
    method: text('method'),
    /** The CSV import that produced this reading, if any. */
    importId: integer('import_id'),
    /** entry | grid | import:<id> | correction (MeasurementSource). */
    source: text('source').$type<MeasurementSource>().notNull().default('entry'),
    supersededBy: integer('superseded_by'),
    deletedAt: text('deleted_at'),
    createdAt: createdAt(),
    createdBy: createdBy().references(() => users.id),
  },
  (t) => [index('checks_coupon_idx').on(t.couponId, t.kind, t.stage), index('checks_import_idx').on(t.importId)],
);

/** An uploaded image of a coupon or a run, stored under DATA_DIR/photos with a generated name. */
export const photos = sqliteTable(
  'photos',
  {
    id: id(),
    couponId: integer('coupon_id').references(() => coupons.id),
    runId: integer('run_id').references(() => runs.id),
    kind: text('kind', { enum: PHOTO_KINDS }).notNull(),
    fileName: text('file_name').notNull(),
    originalName: text('original_name').notNull(),
    mimeType: text('mime_type').notNull(),
    bytes: integer('bytes').notNull(),
    sha256: text('sha256').notNull(),
    caption: text('caption'),
    createdAt: createdAt(),
    createdBy: createdBy().references(() => users.id),
  },
  (t) => [index('photos_coupon_idx').on(t.couponId), index('photos_run_idx').on(t.runId)],
);
