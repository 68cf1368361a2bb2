import { z } from 'zod';
import { labelAddressSchema } from './admin';
import { COUPON_ROLES, TRIAL_STATUSES } from '../constants/records';
import { PLANNING_WARNING_CODES } from '../trials/planning';
import { listQuerySchema, listResponseSchema } from './common';
import { CURE_TEMP_MAX_C, CURE_TEMP_MIN_C, sortOf } from './reference';

const WEEK_MINUTES = 7 * 24 * 60;

const minutes = (what: string, max: number) =>
  z
    .number({ error: `${what} must be a number of minutes` })
    .int(`${what} is a whole number of minutes`)
    .min(0, `${what} cannot be negative`)
    .max(max, `${what} above ${max} minutes is not plausible`)
    .nullable()
    .optional();

export const conditionInputSchema = z.strictObject({
  speciesId: z.number({ error: 'Pick the species' }).int().positive('Pick the species'),
  resinId: z.number({ error: 'Pick the resin' }).int().positive('Pick the resin'),
  processLabel: z
    .string({ error: 'Name the process settings, e.g. "4 h vacuum, overnight soak"' })
    .trim()
    .min(1, 'Name the process settings, e.g. "4 h vacuum, overnight soak"')
    .max(120, 'Use at most 120 characters'),
  vacuumMinutes: minutes('Vacuum time', WEEK_MINUTES),
  soakMinutes: minutes('Soak time', WEEK_MINUTES),
  cureTempC: z
    .number({ error: 'Cure temperature must be a number (°C)' })
    .min(CURE_TEMP_MIN_C, `Cure temperature below ${CURE_TEMP_MIN_C} °C is not a heat cure (was it typed in °F?)`)
    .max(CURE_TEMP_MAX_C, `Cure temperature above ${CURE_TEMP_MAX_C} °C is not plausible (was it typed in °F?)`)
    .nullable()
    .optional(),
  cureMinutes: minutes('Cure time', 48 * 60),
  thicknessMm: z
    .number({ error: 'Thickness must be a number (mm)' })
    .min(1, 'Thickness below 1 mm is not a coupon')
    .max(300, 'Thickness above 300 mm is not plausible for a coupon')
    .nullable()
    .optional(),
  couponsWanted: z
    .number({ error: 'Give the number of coupons wanted' })
    .int('Coupons wanted is a whole number')
    .min(1, 'Plan at least 1 coupon')
    .max(100, 'At most 100 coupons per condition'),
});
export type ConditionInput = z.infer<typeof conditionInputSchema>;

const conditionsSchema = z
  .array(conditionInputSchema)
  .min(1, 'Add at least one condition (species × resin × process)')
  .max(200, 'At most 200 conditions in one trial')
  .superRefine((list, ctx) => {
    const seen = new Map<string, number>();
    list.forEach((c, i) => {
      const key = `${c.speciesId}:${c.resinId}:${c.processLabel.toLowerCase()}`;
      const first = seen.get(key);
      if (first === undefined) seen.set(key, i);
      else ctx.addIssue({ code: 'custom', path: [i, 'processLabel'], message: `Same species, resin and process as condition ${first + 1}` });
    });
  });

const trialFields = {
  title: z.string({ error: 'Give the trial a title' }).trim().min(1, 'Give the trial a title').max(160, 'Use at most 160 characters'),
  question: z
    .string({ error: 'Write the question the trial answers' })
    .trim()
    .min(1, 'Write the question the trial answers')
    .max(1000, 'Use at most 1000 characters'),
  controlsPerSpecies: z
    .number({ error: 'Give the number of controls per species' })
    .int('Controls per species is a whole number')
    .min(0, 'Controls per species cannot be negative')
    .max(50, 'At most 50 controls per species'),
  notes: z.string().trim().max(4000, 'Use at most 4000 characters').nullable().optional(),
  conditions: conditionsSchema,
};

export const createTrialSchema = z.strictObject({ ...trialFields, controlsPerSpecies: trialFields.controlsPerSpecies.default(2) });
export type CreateTrialInput = z.infer<typeof createTrialSchema>;

/**
 * A PATCH that carries `conditions` replaces the grid: a condition with the same species, resin and
 * process label as an existing one updates it in place (its coupons stay attached), new ones are added,
 * and missing ones are removed, which is refused for a condition that already has coupons.
 */
export const updateTrialSchema = z
  .strictObject({ ...trialFields, status: z.enum(TRIAL_STATUSES, { error: `status is one of ${TRIAL_STATUSES.join(', ')}` }) })
  .partial()
  .refine((v) => Object.keys(v).length > 0, { message: 'Change at least one field' });
export type UpdateTrialInput = z.infer<typeof updateTrialSchema>;

export const TRIAL_SORTS = ['code', 'title', 'status', 'createdAt'] as const;
const trialFilters = {
  sort: sortOf(TRIAL_SORTS),
  /** Contains, case-insensitive, in the code, title or question. */
  q: z.string().trim().max(80, 'Use at most 80 characters').optional(),
  status: z.enum(TRIAL_STATUSES, { error: `status is one of ${TRIAL_STATUSES.join(', ')}` }).optional(),
};
export const trialListQuerySchema = listQuerySchema.extend(trialFilters);
export type TrialListQuery = z.infer<typeof trialListQuerySchema>;
/** `GET /api/trials/export.csv`: the list's filters and sort, every matching trial. */
export const trialExportQuerySchema = z.strictObject(trialFilters);
export type TrialExportQuery = z.infer<typeof trialExportQuerySchema>;

export const progressSchema = z.object({
  planned: z.number().int(),
  created: z.number().int(),
  /** Coupons with a current (not superseded, not deleted) dry weighing. */
  dryWeighed: z.number().int(),
  /** Coupons with a current cured weighing. */
  curedWeighed: z.number().int(),
});
export type Progress = z.infer<typeof progressSchema>;

export const trialConditionSchema = z.object({
  id: z.number().int(),
  speciesId: z.number().int(),
  speciesName: z.string(),
  resinId: z.number().int(),
  resinName: z.string(),
  processLabel: z.string(),
  label: z.string(),
  vacuumMinutes: z.number().nullable(),
  soakMinutes: z.number().nullable(),
  cureTempC: z.number().nullable(),
  cureMinutes: z.number().nullable(),
  thicknessMm: z.number().nullable(),
  couponsWanted: z.number().int(),
  progress: progressSchema,
});
export type TrialCondition = z.infer<typeof trialConditionSchema>;

export const planningWarningSchema = z.object({
  code: z.enum(PLANNING_WARNING_CODES),
  message: z.string(),
  conditionIndex: z.number().int().optional(),
  speciesId: z.number().int().optional(),
  resinId: z.number().int().optional(),
});

export const trialSummarySchema = z.object({
  id: z.number().int(),
  code: z.string(),
  title: z.string(),
  question: z.string(),
  status: z.enum(TRIAL_STATUSES),
  controlsPerSpecies: z.number().int(),
  conditionCount: z.number().int(),
  couponCount: z.number().int(),
  speciesCount: z.number().int(),
  resinCount: z.number().int(),
  /** Coupons planned in the whole trial, treated and controls. */
  plannedCount: z.number().int(),
  /** Coupons at their last weighing: cured for treated coupons, dry for untreated controls. */
  doneCount: z.number().int(),
  createdAt: z.string(),
});
export type TrialSummary = z.infer<typeof trialSummarySchema>;
export const trialListSchema = listResponseSchema(trialSummarySchema);

export const trialSchema = trialSummarySchema.extend({
  notes: z.string().nullable(),
  conditions: z.array(trialConditionSchema),
  /** Untreated controls, per species in the grid. */
  controls: z.array(z.object({ speciesId: z.number().int(), speciesName: z.string(), progress: progressSchema })),
  totals: progressSchema,
  warnings: z.array(planningWarningSchema),
  /** The runs its coupons went through, with how many of the trial's coupons each holds. */
  runs: z.array(z.object({ id: z.number().int(), code: z.string(), couponCount: z.number().int() })),
});
export type Trial = z.infer<typeof trialSchema>;
export const trialResponseSchema = z.object({ trial: trialSchema });

export const trialCouponSchema = z.object({
  id: z.number().int(),
  tag: z.string(),
  role: z.enum(COUPON_ROLES),
  speciesId: z.number().int(),
  conditionId: z.number().int().nullable(),
});
export const createTrialCouponsResponseSchema = z.object({
  /** How many coupons this call created; 0 when every planned coupon already existed. */
  created: z.number().int(),
  coupons: z.array(trialCouponSchema),
  trial: trialSchema,
});
export type CreateTrialCouponsResponse = z.infer<typeof createTrialCouponsResponseSchema>;

export const couponLabelSchema = z.object({
  couponId: z.number().int(),
  tag: z.string(),
  speciesName: z.string(),
  role: z.enum(COUPON_ROLES),
  conditionLabel: z.string(),
  /** The coupon's page, which the QR code opens. */
  url: z.string(),
  qrSvg: z.string(),
});
export type CouponLabel = z.infer<typeof couponLabelSchema>;
export const labelSheetSchema = z.object({
  trial: z.object({ id: z.number().int(), code: z.string(), title: z.string() }),
  /** The address the QR codes open, and whether a phone can open it. */
  address: labelAddressSchema,
  labels: z.array(couponLabelSchema),
});
export type LabelSheet = z.infer<typeof labelSheetSchema>;
