import { z } from 'zod';
import { CHECK_KINDS, CHECK_STAGES, COUPON_ROLES, HARDNESS_SCALES, WEIGHING_STAGES } from '../constants/records';
import { MC_SOURCES, SWELLING_BASES } from '../coupons/metrics';
import { listQuerySchema, listResponseSchema } from './common';
import { sortOf } from './reference';
import { photoSchema, timestampSchema } from './runs';

const idSchema = z.number().int().positive();

export const couponTagSchema = z
  .string()
  .trim()
  .min(1, 'Enter a tag')
  .max(40)
  .regex(/^[A-Za-z0-9][A-Za-z0-9 ._/-]*$/, 'Use letters, digits, spaces and . _ / -');
const sourceBoardSchema = z.string().trim().max(120);
const notesSchema = z.string().trim().max(2000, 'Use at most 2000 characters');
/** Why a measurement was corrected or deleted; the audit log keeps it beside the old value. */
export const reasonSchema = z.string().trim().min(3, 'Say why (at least 3 characters)').max(500);

export const createCouponSchema = z.strictObject({
  tag: couponTagSchema,
  speciesId: idSchema,
  role: z.enum(COUPON_ROLES),
  trialId: idSchema.nullable().optional(),
  conditionId: idSchema.nullable().optional(),
  sourceBoard: sourceBoardSchema.nullable().optional(),
  notes: notesSchema.nullable().optional(),
});
export type CreateCouponInput = z.infer<typeof createCouponSchema>;

export const updateCouponSchema = z
  .strictObject({
    tag: couponTagSchema.optional(),
    speciesId: idSchema.optional(),
    role: z.enum(COUPON_ROLES).optional(),
    sourceBoard: sourceBoardSchema.nullable().optional(),
    notes: notesSchema.nullable().optional(),
    /** Optional note for the audit log. */
    reason: reasonSchema.optional(),
    /** The coupon's `version` as the editor saw it; a stale one is refused (409) instead of overwriting. */
    version: z.number().int().min(1),
  })
  .refine((v) => Object.entries(v).some(([k, x]) => k !== 'reason' && k !== 'version' && x !== undefined), { message: 'Change at least one field' });
export type UpdateCouponInput = z.infer<typeof updateCouponSchema>;

/** Columns the coupon list sorts by (`sort=drySg`, `sort=-wpgPct`); ties break on the id. */
export const COUPON_SORTS = ['tag', 'createdAt', 'id', 'drySg', 'wpgPct', 'resinLoadingKgM3'] as const;
/**
 * `waitingFor`: coupons that still lack a reading. `soaked-weighing` and `cured-weighing` concern treated
 * coupons only (a control never sees resin); `dry-weighing` and `dry-dimensions` concern every coupon.
 */
export const COUPON_WAITING_FOR = ['dry-weighing', 'soaked-weighing', 'cured-weighing', 'dry-dimensions'] as const;
export type CouponWaitingFor = (typeof COUPON_WAITING_FOR)[number];

const couponFilters = {
  sort: sortOf(COUPON_SORTS),
  /** Contains, case-insensitive, in the tag. */
  q: z.string().trim().max(40, 'Use at most 40 characters').optional(),
  runId: z.coerce.number().int().positive().optional(),
  trialId: z.coerce.number().int().positive().optional(),
  speciesId: z.coerce.number().int().positive().optional(),
  conditionId: z.coerce.number().int().positive().optional(),
  role: z.enum(COUPON_ROLES).optional(),
  waitingFor: z.enum(COUPON_WAITING_FOR, { error: `waitingFor is one of ${COUPON_WAITING_FOR.join(', ')}` }).optional(),
};

export const couponListQuerySchema = listQuerySchema.extend({
  ...couponFilters,
  /**
   * Keyset paging: the `nextCursor` of the previous page. With it, `page` is ignored and the server reads
   * on from that row instead of skipping the rows before it (use it for pages far down a long list).
   */
  after: z.string().max(200).optional(),
});
export type CouponListQuery = z.infer<typeof couponListQuerySchema>;

/** `GET /api/coupons/export.csv`: the list's filters and sort, every matching coupon. */
export const couponExportQuerySchema = z.strictObject(couponFilters);
export type CouponExportQuery = z.infer<typeof couponExportQuerySchema>;

// Bounds here only keep out typing accidents and absurd numbers; physically impossible values
// (non-positive masses, cured below dry, moisture outside 0–300 %) are refused by the server with 422
// and the reason, because they depend on the coupon's other readings.
const massSchema = z.number().max(100_000, 'Above 100 kg is not a coupon');
const lengthSchema = z.number().max(2000, 'Above 2000 mm is not a coupon');
const volumeSchema = z.number().max(100_000, 'Above 100 000 cm³ is not a coupon');
const methodSchema = z.string().trim().max(120);

export const weighingInputSchema = z.strictObject({
  stage: z.enum(WEIGHING_STAGES),
  massG: massSchema,
  measuredAt: timestampSchema,
});
export type WeighingInput = z.infer<typeof weighingInputSchema>;

const dimensionCheckSchema = z
  .strictObject({
    kind: z.literal('dimension'),
    stage: z.enum(CHECK_STAGES),
    measuredAt: timestampSchema,
    lengthMm: lengthSchema.optional(),
    widthMm: lengthSchema.optional(),
    thicknessMm: lengthSchema.optional(),
    /** Volume by immersion, when calipers cannot measure the piece. */
    volumeCm3: volumeSchema.optional(),
    method: methodSchema.optional(),
  })
  .superRefine((v, ctx) => {
    const dims = [v.lengthMm, v.widthMm, v.thicknessMm];
    const some = dims.some((d) => d !== undefined);
    if (v.volumeCm3 === undefined && !some) {
      ctx.addIssue({ code: 'custom', path: ['lengthMm'], message: 'Give length, width and thickness, or a volume' });
      return;
    }
    if (some) {
      (['lengthMm', 'widthMm', 'thicknessMm'] as const).forEach((f) => {
        if (v[f] === undefined) ctx.addIssue({ code: 'custom', path: [f], message: 'Give all three dimensions' });
      });
    }
  });

const hardnessCheckSchema = z.strictObject({
  kind: z.literal('hardness'),
  stage: z.enum(CHECK_STAGES),
  measuredAt: timestampSchema,
  hardnessValue: z.number().max(100_000),
  /** Shore D, Janka (N) and Brinell HB are different tests; a value is kept on its own scale. */
  hardnessScale: z.enum(HARDNESS_SCALES),
  method: methodSchema.optional(),
});

const moistureCheckSchema = z.strictObject({
  kind: z.literal('moisture'),
  stage: z.enum(CHECK_STAGES),
  measuredAt: timestampSchema,
  moisturePct: z.number(),
  method: methodSchema.optional(),
});

export const checkInputSchema = z.discriminatedUnion('kind', [dimensionCheckSchema, hardnessCheckSchema, moistureCheckSchema]);
export type CheckInput = z.infer<typeof checkInputSchema>;

export const correctWeighingSchema = z.strictObject({
  massG: massSchema,
  reason: reasonSchema,
  measuredAt: timestampSchema.optional(),
});
export type CorrectWeighingInput = z.infer<typeof correctWeighingSchema>;

/** A correction of a check: the values that change (of the check's own kind) and why. */
export const correctCheckSchema = z
  .strictObject({
    lengthMm: lengthSchema.optional(),
    widthMm: lengthSchema.optional(),
    thicknessMm: lengthSchema.optional(),
    volumeCm3: volumeSchema.optional(),
    hardnessValue: z.number().max(100_000).optional(),
    hardnessScale: z.enum(HARDNESS_SCALES).optional(),
    moisturePct: z.number().optional(),
    measuredAt: timestampSchema.optional(),
    method: methodSchema.optional(),
    reason: reasonSchema,
  })
  .refine((v) => Object.entries(v).some(([k, x]) => k !== 'reason' && x !== undefined), { message: 'Change at least one value' });
export type CorrectCheckInput = z.infer<typeof correctCheckSchema>;

export const deleteMeasurementSchema = z.strictObject({ reason: reasonSchema });
export type DeleteMeasurementInput = z.infer<typeof deleteMeasurementSchema>;

export const batchMeasurementsSchema = z.strictObject({
  entries: z
    .array(
      z.strictObject({
        couponId: idSchema,
        weighings: z.array(weighingInputSchema).max(20).optional(),
        checks: z.array(checkInputSchema).max(20).optional(),
      }),
    )
    .min(1, 'Send at least one entry')
    .max(500, 'At most 500 entries at once'),
});
export type BatchMeasurementsInput = z.infer<typeof batchMeasurementsSchema>;

// Answers.

export const weighingSchema = z.object({
  id: z.number().int(),
  couponId: z.number().int(),
  stage: z.enum(WEIGHING_STAGES),
  massG: z.number(),
  measuredAt: z.string(),
  importId: z.number().int().nullable(),
  /** entry | grid | import:<id> | correction */
  source: z.string(),
  supersededBy: z.number().int().nullable(),
  deletedAt: z.string().nullable(),
  createdAt: z.string(),
  createdBy: z.number().int().nullable(),
});
export type WeighingOut = z.infer<typeof weighingSchema>;

export const checkSchema = z.object({
  id: z.number().int(),
  couponId: z.number().int(),
  kind: z.enum(CHECK_KINDS),
  stage: z.enum(CHECK_STAGES),
  measuredAt: z.string(),
  lengthMm: z.number().nullable(),
  widthMm: z.number().nullable(),
  thicknessMm: z.number().nullable(),
  volumeCm3: z.number().nullable(),
  hardnessValue: z.number().nullable(),
  hardnessScale: z.enum(HARDNESS_SCALES).nullable(),
  moisturePct: z.number().nullable(),
  method: z.string().nullable(),
  importId: z.number().int().nullable(),
  /** entry | grid | import:<id> | correction */
  source: z.string(),
  supersededBy: z.number().int().nullable(),
  deletedAt: z.string().nullable(),
  createdAt: z.string(),
  createdBy: z.number().int().nullable(),
});
export type CheckOut = z.infer<typeof checkSchema>;

const n = z.number().nullable();
export const couponMetricsSchema = z.object({
  dryMassG: n,
  soakedMassG: n,
  curedMassG: n,
  wetTestMassG: n,
  dryVolumeCm3: n,
  curedVolumeCm3: n,
  wetTestVolumeCm3: n,
  thicknessMm: n,
  mcPct: n,
  mcSource: z.enum(MC_SOURCES).nullable(),
  dryDensityKgM3: n,
  drySg: n,
  wpgPct: n,
  wetUptakePct: n,
  resinLoadingKgM3: n,
  voidFillPct: n,
  maxWpgPct: n,
  cureLossPct: n,
  bulkingPct: n,
  swellingPct: n,
  swellingBasis: z.enum(SWELLING_BASES).nullable(),
  hardness: z.array(z.object({ stage: z.enum(CHECK_STAGES), scale: z.enum(HARDNESS_SCALES), value: z.number() })),
  problems: z.array(z.object({ metric: z.string(), message: z.string() })),
});

export const antiSwellSchema = z.object({
  /** The ASE on the volume basis, the water-repellent effectiveness (WRE) on the mass basis; see measure. */
  asePct: z.number(),
  basis: z.enum(SWELLING_BASES),
  measure: z.enum(['ase', 'wre']),
  name: z.string(),
  controlSwellingPct: z.number(),
  controlCount: z.number().int(),
});

export const measurementWarningSchema = z.object({ field: z.string(), message: z.string() });
export type MeasurementWarning = z.infer<typeof measurementWarningSchema>;

export const couponConditionSchema = z.object({
  id: z.number().int(),
  label: z.string(),
  processLabel: z.string(),
  plannedResin: z.object({ id: z.number().int(), name: z.string() }),
});
export type CouponCondition = z.infer<typeof couponConditionSchema>;

export const couponSchema = z.object({
  id: z.number().int(),
  tag: z.string(),
  /** Send it back with an edit (PATCH); it changes with every edit. */
  version: z.number().int(),
  trialId: z.number().int().nullable(),
  trialCode: z.string().nullable(),
  conditionId: z.number().int().nullable(),
  /**
   * The trial condition the coupon was made for (species × resin × process settings): its label as the
   * trial shows it, and the resin the plan wants, which may differ from the resin of the run's lot.
   */
  condition: couponConditionSchema.nullable(),
  speciesId: z.number().int(),
  speciesName: z.string(),
  /** The species' reference densities, so the client can flag an implausible SG while it is typed. */
  speciesDensity: z.object({
    basicSg: z.number().nullable(),
    sg12: z.number().nullable(),
    measuredDensityKgM3: z.number().nullable(),
    measuredMoisturePct: z.number().nullable(),
    sgCoefficientOfVariation: z.number().nullable(),
  }),
  role: z.enum(COUPON_ROLES),
  sourceBoard: z.string().nullable(),
  runId: z.number().int().nullable(),
  runCode: z.string().nullable(),
  notes: z.string().nullable(),
  createdAt: z.string(),
  resin: z.object({ id: z.number().int(), name: z.string(), curedDensityGcm3: z.number(), liquidDensityGcm3: z.number() }).nullable(),
  /** Current readings only (not superseded, not deleted). */
  weighings: z.array(weighingSchema),
  checks: z.array(checkSchema),
  metrics: couponMetricsSchema,
  /** Against the controls of the same species in the same trial; null for controls. */
  antiSwell: antiSwellSchema.nullable(),
  /** Implausible but possible: e.g. a dry SG far from the species reference. */
  warnings: z.array(measurementWarningSchema),
});
export type CouponOut = z.infer<typeof couponSchema>;
export const couponListSchema = listResponseSchema(couponSchema).extend({
  /** Pass as `after` for the next page (keyset); null on the last page. */
  nextCursor: z.string().nullable().optional(),
});
/**
 * One row of `GET /api/coupons`: the coupon's keys and the figures the list screen shows, read from the
 * per-coupon results table in one query. The full answer (readings, warnings, ASE) is `GET /api/coupons/:id`,
 * and `GET /api/coupons/full` for the entry grid.
 */
export const couponListRowSchema = z.object({
  id: z.number().int(),
  tag: z.string(),
  trialId: z.number().int().nullable(),
  trialCode: z.string().nullable(),
  conditionId: z.number().int().nullable(),
  condition: couponConditionSchema.nullable(),
  speciesId: z.number().int(),
  speciesName: z.string(),
  role: z.enum(COUPON_ROLES),
  sourceBoard: z.string().nullable(),
  runId: z.number().int().nullable(),
  runCode: z.string().nullable(),
  createdAt: z.string(),
  /** Current masses per stage, g. */
  dryMassG: n,
  soakedMassG: n,
  curedMassG: n,
  drySg: n,
  wpgPct: n,
  resinLoadingKgM3: n,
  voidFillPct: n,
  /** How many metrics are blank although their readings are there, and the first reason. */
  problemCount: z.number().int(),
  firstProblem: z.string().nullable(),
});
export type CouponListRow = z.infer<typeof couponListRowSchema>;
export const couponRowListSchema = listResponseSchema(couponListRowSchema).extend({
  /** Pass as `after` for the next page (keyset); null on the last page. */
  nextCursor: z.string().nullable().optional(),
});
export type CouponRowList = z.infer<typeof couponRowListSchema>;

export const couponDetailSchema = couponSchema.extend({ photos: z.array(photoSchema) });
export type CouponDetail = z.infer<typeof couponDetailSchema>;
export const couponResponseSchema = z.object({ coupon: couponDetailSchema });

export const weighingResponseSchema = z.object({ weighing: weighingSchema, coupon: couponSchema, warnings: z.array(measurementWarningSchema) });
export const checkResponseSchema = z.object({ check: checkSchema, coupon: couponSchema, warnings: z.array(measurementWarningSchema) });

export const batchResponseSchema = z.object({
  written: z.object({ weighings: z.number().int(), checks: z.number().int() }),
  coupons: z.array(couponSchema),
  warnings: z.array(measurementWarningSchema.extend({ entry: z.number().int(), couponId: z.number().int() })),
});

export const auditEntrySchema = z.object({
  id: z.number().int(),
  action: z.string(),
  entity: z.string(),
  entityId: z.string().nullable(),
  before: z.unknown(),
  after: z.unknown(),
  reason: z.string().nullable(),
  actorId: z.number().int().nullable(),
  /** The actor's name as it was when the entry was written, not as it is now; with the e-mail, which names the account. */
  actorName: z.string().nullable(),
  actorEmail: z.string().nullable(),
  createdAt: z.string(),
});

export const couponHistorySchema = z.object({
  couponId: z.number().int(),
  audit: z.array(auditEntrySchema),
  /** Every reading ever entered, superseded and deleted ones included, oldest first. */
  weighings: z.array(weighingSchema),
  checks: z.array(checkSchema),
});
export type CouponHistory = z.infer<typeof couponHistorySchema>;

/** A weighing or check corrected: the new reading, the one it superseded, the coupon as it now stands. */
export const correctedWeighingResponseSchema = z.object({
  weighing: weighingSchema,
  superseded: weighingSchema,
  coupon: couponSchema,
  warnings: z.array(measurementWarningSchema),
});
export const correctedCheckResponseSchema = z.object({
  check: checkSchema,
  superseded: checkSchema,
  coupon: couponSchema,
  warnings: z.array(measurementWarningSchema),
});
/** A weighing or check taken back: the coupon as it now stands. */
export const deletedMeasurementResponseSchema = z.object({ coupon: couponSchema });
