import { z } from 'zod';
import { COUPON_ROLES, GAUGE_UNITS, LOT_STATUSES, PHOTO_KINDS, RUN_STAGES, WEIGHING_STAGES } from '../constants/records';
import { CHECK_STATUSES, RUN_RULES } from '../runs/checks';
import { RUN_STATUSES } from '../runs/stages';
import { DUE_KINDS } from '../runs/timers';
import { BAROMETER_RANGE_KPA } from '../domain/vacuum';
import { altitudeMSchema, listQuerySchema, listResponseSchema } from './common';
import { sortOf } from './reference';
import { realIsoDate } from './dates';

const ISO_WITH_ZONE = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d{1,9})?)?(Z|[+-]\d{2}:?\d{2})$/;

/**
 * A moment in time with its zone (Z or an offset), minutes or finer; stored as UTC ISO. A time without
 * a zone is refused because the bench and the server may not share one.
 */
export const timestampSchema = z
  .string()
  .max(40)
  .regex(ISO_WITH_ZONE, 'Give a date and time with its zone, e.g. 2026-03-01T14:30:00Z')
  .pipe(realIsoDate('Not a real date and time'))
  .transform((s) => new Date(s).toISOString());

const idSchema = z.number().int().positive();
const notesSchema = z.string().trim().max(2000, 'Use at most 2000 characters');
const couponIdsSchema = z
  .array(idSchema)
  .max(500, 'At most 500 coupons per run')
  .refine((ids) => new Set(ids).size === ids.length, 'A coupon is listed twice');

export const runCodeSchema = z
  .string()
  .trim()
  .min(1, 'Enter a run code')
  .max(40)
  .regex(/^[A-Za-z0-9][A-Za-z0-9 ._/-]*$/, 'Use letters, digits, spaces and . _ / -');
const chamberSchema = z.string().trim().min(1, 'Name the chamber').max(80);
const altitudeSchema = altitudeMSchema;

export const createRunSchema = z.strictObject({
  /** Generated (R<yy>-<nnn>) when left out. */
  code: runCodeSchema.optional(),
  chamber: chamberSchema,
  resinLotId: idSchema.nullable().optional(),
  /** Copied from the shop settings when left out. */
  altitudeM: altitudeSchema.optional(),
  notes: notesSchema.nullable().optional(),
  couponIds: couponIdsSchema.optional(),
});
export type CreateRunInput = z.infer<typeof createRunSchema>;

export const updateRunSchema = z
  .strictObject({
    code: runCodeSchema.optional(),
    chamber: chamberSchema.optional(),
    resinLotId: idSchema.nullable().optional(),
    altitudeM: altitudeSchema.optional(),
    notes: notesSchema.nullable().optional(),
    addCouponIds: couponIdsSchema.optional(),
    removeCouponIds: couponIdsSchema.optional(),
    /** Why: required when the change moves recorded results (a new altitude moves the absolute pressures). */
    reason: z.string().trim().min(3, 'Say why (at least 3 characters)').max(500).optional(),
  })
  .refine((v) => Object.entries(v).some(([k, x]) => k !== 'reason' && x !== undefined), { message: 'Change at least one field' });
export type UpdateRunInput = z.infer<typeof updateRunSchema>;

/** Columns the run list sorts by; ties break on the id, newest first. */
export const RUN_SORTS = ['id', 'code', 'chamber', 'createdAt'] as const;
const runFilters = {
  sort: sortOf(RUN_SORTS),
  /** Contains, case-insensitive, in the code or the chamber. */
  q: z.string().trim().max(80, 'Use at most 80 characters').optional(),
  /** `open` is every run whose cure has not ended. */
  status: z.enum([...RUN_STATUSES, 'open']).optional(),
  /** Runs whose latest recorded stage is this one (a run in the oven: `stage=cure`). */
  stage: z.enum(RUN_STAGES, { error: `stage is one of ${RUN_STAGES.join(', ')}` }).optional(),
  resinLotId: z.coerce.number().int().positive().optional(),
};
export const runListQuerySchema = listQuerySchema.extend(runFilters);
export type RunListQuery = z.infer<typeof runListQuerySchema>;
/** `GET /api/runs/export.csv`: the list's filters and sort, every matching run. */
export const runExportQuerySchema = z.strictObject(runFilters);
export type RunExportQuery = z.infer<typeof runExportQuerySchema>;

export const gaugeReadingInputSchema = z.strictObject({
  at: timestampSchema,
  /** Vacuum as the gauge shows it (below ambient), in its own unit. */
  gaugeValue: z.number().min(0, 'A vacuum gauge reads 0 or more').max(1000),
  gaugeUnit: z.enum(GAUGE_UNITS),
});
export type GaugeReadingInput = z.infer<typeof gaugeReadingInputSchema>;

/**
 * The shop's barometer while the vacuum was read, kPa: station pressure (what the barometer in the shop
 * shows), not the sea-level figure a weather report gives. Outside 50–110 kPa it is a unit slip.
 */
export const barometerSchema = z
  .number()
  .min(BAROMETER_RANGE_KPA.min, `A barometer in a workshop reads at least ${BAROMETER_RANGE_KPA.min} kPa (14.8 inHg); check the unit`)
  .max(BAROMETER_RANGE_KPA.max, `A barometer reads at most ${BAROMETER_RANGE_KPA.max} kPa (32.5 inHg); check the unit`);

const ovenTempSchema = z.number().min(-20, 'Below −20 °C is not an oven temperature').max(300, 'Above 300 °C is not a curing oven');

export const recordStageSchema = z
  .strictObject({
    stage: z.enum(RUN_STAGES),
    startedAt: timestampSchema,
    endedAt: timestampSchema.nullable().optional(),
    plannedMinutes: z
      .number()
      .int()
      .min(1)
      .max(14 * 24 * 60)
      .nullable()
      .optional(),
    bubblingStoppedAt: timestampSchema.nullable().optional(),
    /** Vacuum stage: the shop's barometer, kPa, in place of the standard atmosphere at the run's altitude. */
    barometerKpa: barometerSchema.nullable().optional(),
    ovenSetC: ovenTempSchema.nullable().optional(),
    ovenMeasuredC: ovenTempSchema.nullable().optional(),
    notes: notesSchema.nullable().optional(),
    readings: z.array(gaugeReadingInputSchema).max(200).optional(),
  })
  .superRefine((v, ctx) => {
    const oven = v.stage === 'drying' || v.stage === 'cure';
    for (const f of ['ovenSetC', 'ovenMeasuredC'] as const) {
      if (!oven && v[f] != null) ctx.addIssue({ code: 'custom', path: [f], message: 'Oven temperatures belong to the drying or cure stage' });
    }
    if (v.stage !== 'vacuum' && v.bubblingStoppedAt != null) {
      ctx.addIssue({ code: 'custom', path: ['bubblingStoppedAt'], message: 'Bubbling is recorded at the vacuum stage' });
    }
    if (v.stage !== 'vacuum' && v.barometerKpa != null) {
      ctx.addIssue({ code: 'custom', path: ['barometerKpa'], message: 'The barometer is recorded with the gauge readings, at the vacuum stage' });
    }
  });
export type RecordStageInput = z.infer<typeof recordStageSchema>;

export const gaugeReadingSchema = z.object({
  id: z.number().int(),
  stage: z.enum(RUN_STAGES),
  at: z.string(),
  gaugeValue: z.number(),
  gaugeUnit: z.enum(GAUGE_UNITS),
  absoluteKpa: z.number(),
  percentVacuum: z.number(),
});
export type GaugeReading = z.infer<typeof gaugeReadingSchema>;

export const runStageSchema = z.object({
  stage: z.enum(RUN_STAGES),
  startedAt: z.string(),
  endedAt: z.string().nullable(),
  plannedMinutes: z.number().int().nullable(),
  /** Planned end (start + planned minutes), when planned. */
  plannedEndAt: z.string().nullable(),
  bubblingStoppedAt: z.string().nullable(),
  /** The shop's barometer while the gauge was read, kPa, when recorded. */
  barometerKpa: z.number().nullable(),
  /** The ambient pressure this stage's readings were subtracted from, kPa, and where it came from. */
  ambientKpa: z.number(),
  ambientSource: z.enum(['barometer', 'standard-atmosphere']),
  ovenSetC: z.number().nullable(),
  ovenMeasuredC: z.number().nullable(),
  notes: z.string().nullable(),
  readings: z.array(gaugeReadingSchema),
});
export type RunStageOut = z.infer<typeof runStageSchema>;

export const ruleCheckSchema = z.object({
  rule: z.enum(RUN_RULES),
  status: z.enum(CHECK_STATUSES),
  reason: z.string(),
  couponIds: z.array(z.number().int()).optional(),
});

export const dueItemSchema = z.object({
  kind: z.enum(DUE_KINDS),
  stage: z.enum(RUN_STAGES),
  dueAt: z.string(),
  overdue: z.boolean(),
  message: z.string(),
});

export const cautionSchema = z.object({ id: z.string(), title: z.string(), text: z.string() });

export const runLotSchema = z.object({
  id: z.number().int(),
  code: z.string(),
  activatedAt: z.string(),
  status: z.enum(LOT_STATUSES),
  reuseCount: z.number().int(),
  resin: z.object({
    id: z.number().int(),
    name: z.string(),
    liquidDensityGcm3: z.number(),
    curedDensityGcm3: z.number(),
    cureMinC: z.number(),
    cureMaxC: z.number(),
    shelfLifeDays: z.number().int(),
  }),
});

export const runCouponSchema = z.object({
  id: z.number().int(),
  tag: z.string(),
  role: z.enum(COUPON_ROLES),
  speciesId: z.number().int(),
  speciesName: z.string(),
  stagesWeighed: z.array(z.enum(WEIGHING_STAGES)),
});

export const photoSchema = z.object({
  id: z.number().int(),
  couponId: z.number().int().nullable(),
  runId: z.number().int().nullable(),
  kind: z.enum(PHOTO_KINDS),
  originalName: z.string(),
  mimeType: z.string(),
  bytes: z.number().int(),
  caption: z.string().nullable(),
  createdAt: z.string(),
  url: z.string(),
});
export type PhotoOut = z.infer<typeof photoSchema>;

export const photoFieldsSchema = z.strictObject({
  kind: z.enum(PHOTO_KINDS).default('before'),
  caption: z.string().trim().max(200).optional(),
});

const runProgressSchema = z.object({
  current: z.enum(RUN_STAGES).nullable(),
  currentOpen: z.boolean(),
  status: z.enum(RUN_STATUSES),
});

export const runSummarySchema = z.object({
  id: z.number().int(),
  code: z.string(),
  chamber: z.string(),
  resinLotId: z.number().int().nullable(),
  lotCode: z.string().nullable(),
  resinName: z.string().nullable(),
  altitudeM: z.number(),
  couponCount: z.number().int(),
  progress: runProgressSchema,
  startedAt: z.string().nullable(),
  nextDue: dueItemSchema.nullable(),
  checkCounts: z.object({ ok: z.number().int(), warn: z.number().int(), fail: z.number().int(), pending: z.number().int() }),
  createdAt: z.string(),
});
export type RunSummary = z.infer<typeof runSummarySchema>;
export const runListSchema = listResponseSchema(runSummarySchema);

export const runDetailSchema = z.object({
  id: z.number().int(),
  code: z.string(),
  chamber: z.string(),
  resinLotId: z.number().int().nullable(),
  lot: runLotSchema.nullable(),
  altitudeM: z.number(),
  /** Standard-atmosphere pressure at the run's altitude, kPa: what a gauge reading is subtracted from. */
  ambientKpa: z.number(),
  notes: z.string().nullable(),
  createdAt: z.string(),
  createdBy: z.number().int().nullable(),
  stages: z.array(runStageSchema),
  progress: runProgressSchema,
  startableStages: z.array(z.enum(RUN_STAGES)),
  coupons: z.array(runCouponSchema),
  checks: z.array(ruleCheckSchema),
  due: z.object({ next: dueItemSchema.nullable(), items: z.array(dueItemSchema) }),
  cautions: z.record(z.enum(RUN_STAGES), z.array(cautionSchema)),
  photos: z.array(photoSchema),
});
export type RunDetail = z.infer<typeof runDetailSchema>;
export const runResponseSchema = z.object({ run: runDetailSchema });
export const runChecksResponseSchema = z.object({ runId: z.number().int(), checks: z.array(ruleCheckSchema) });

export const BENCH_ITEM_KINDS = ['stage-end', 'soak-minimum', 'weighing-due', 'drying-check-due'] as const;

export const benchQuerySchema = z.strictObject({
  /** How far ahead "soon" reaches, hours. */
  withinHours: z.coerce.number().min(0).max(72).default(4),
  /** At most this many items, the most urgent first; `total` says how many there were. */
  limit: z.coerce.number().int().min(1).max(500).default(100),
});
export type BenchQuery = z.infer<typeof benchQuerySchema>;

export const benchItemSchema = z.object({
  kind: z.enum(BENCH_ITEM_KINDS),
  runId: z.number().int(),
  runCode: z.string(),
  /** For coupon work: the first coupon waiting (where the click goes); null for a run's stage. */
  /** For coupon work: the first coupon waiting (where the click goes); null for a run's stage. */
  couponId: z.number().int().nullable(),
  couponTag: z.string().nullable(),
  /** How many coupons of the run wait for this (one item per run and weighing, not one per coupon); 0 for a stage. */
  couponCount: z.number().int(),
  /** The first coupons waiting, by tag (at most BENCH_COUPONS_SHOWN); `couponCount` counts them all. */
  coupons: z.array(z.object({ id: z.number().int(), tag: z.string() })),
  stage: z.enum(RUN_STAGES).nullable(),
  weighingStage: z.enum(WEIGHING_STAGES).nullable(),
  /** Null when it is due as soon as possible (e.g. a weighing that is simply missing). */
  dueAt: z.string().nullable(),
  overdue: z.boolean(),
  message: z.string(),
  /** Where one click takes the user: the run's stage form, or the coupon's weighing form at a stage. */
  target: z.object({
    entity: z.enum(['run', 'coupon']),
    id: z.number().int(),
    form: z.enum(['stage', 'weighing']),
    stage: z.string(),
  }),
});
export type BenchItem = z.infer<typeof benchItemSchema>;
export const BENCH_COUPONS_SHOWN = 20;
export const benchResponseSchema = z.object({
  now: z.string(),
  withinHours: z.number(),
  items: z.array(benchItemSchema),
  /** Items before the limit. */
  total: z.number().int(),
});
export type BenchResponse = z.infer<typeof benchResponseSchema>;

// ---------------------------------------------------------------------------------------------
// Corrections of a recorded stage. A recorded time, reading or temperature is never overwritten in
// passing: changing one takes a correction with a reason, and the version it replaces is kept.

export const runStageParamsSchema = z.strictObject({ id: z.coerce.number().int().positive(), stage: z.enum(RUN_STAGES) });

const correctionReasonSchema = z.string().trim().min(3, 'Say why the record changes (at least 3 characters)').max(500, 'Use at most 500 characters');

/** A recorded gauge reading to change (any of its fields) or to take back (`remove`). */
export const readingCorrectionSchema = z.union([
  z.strictObject({ id: idSchema, remove: z.literal(true) }),
  z.strictObject({
    id: idSchema,
    at: timestampSchema.optional(),
    gaugeValue: z.number().min(0, 'A vacuum gauge reads 0 or more').max(1000).optional(),
    gaugeUnit: z.enum(GAUGE_UNITS).optional(),
  }),
]);

export const correctStageSchema = z
  .strictObject({
    startedAt: timestampSchema.optional(),
    endedAt: timestampSchema.nullable().optional(),
    plannedMinutes: z
      .number()
      .int()
      .min(1)
      .max(14 * 24 * 60)
      .nullable()
      .optional(),
    bubblingStoppedAt: timestampSchema.nullable().optional(),
    barometerKpa: barometerSchema.nullable().optional(),
    ovenSetC: ovenTempSchema.nullable().optional(),
    ovenMeasuredC: ovenTempSchema.nullable().optional(),
    notes: notesSchema.nullable().optional(),
    readings: z.array(readingCorrectionSchema).max(200).optional(),
    addReadings: z.array(gaugeReadingInputSchema).max(200).optional(),
    reason: correctionReasonSchema,
  })
  .refine((v) => Object.entries(v).some(([k, x]) => k !== 'reason' && x !== undefined), { message: 'Change at least one value' });
export type CorrectStageInput = z.infer<typeof correctStageSchema>;

/** One change to a run's record, newest first, with who made it and why. */
export const runHistoryEntrySchema = z.object({
  id: z.number().int(),
  action: z.string(),
  entity: z.string(),
  /** The stage the change is about, when it is about one. */
  stage: z.enum(RUN_STAGES).nullable(),
  before: z.unknown(),
  after: z.unknown(),
  reason: z.string().nullable(),
  actorName: z.string().nullable(),
  createdAt: z.string(),
});
export type RunHistoryEntry = z.infer<typeof runHistoryEntrySchema>;

/** A stage as it was before a correction replaced it: its values and its gauge readings. */
export const stageVersionSchema = z.object({
  id: z.number().int(),
  stage: z.enum(RUN_STAGES),
  values: z.record(z.string(), z.unknown()),
  readings: z.array(z.record(z.string(), z.unknown())),
  reason: z.string(),
  replacedAt: z.string(),
  replacedBy: z.string().nullable(),
});
export type StageVersion = z.infer<typeof stageVersionSchema>;

export const runHistorySchema = z.object({
  runId: z.number().int(),
  entries: z.array(runHistoryEntrySchema),
  /** Every replaced version of a stage, newest first. */
  versions: z.array(stageVersionSchema),
});
export type RunHistory = z.infer<typeof runHistorySchema>;

/** A photo uploaded to a coupon or a run. */
export const photoResponseSchema = z.object({ photo: photoSchema });
