import { z } from 'zod';
import { LOT_STATUSES, SPECIES_ORIGINS } from '../constants/records';
import { DomainError } from '../domain/errors';
import { basicSpecificGravity, specificGravityAtMoisture } from '../domain/moisture';
import { CURE_TEMPERATURE_RANGE_C } from '../domain/rules-of-thumb';
import { listQuerySchema, listResponseSchema } from './common';

// Plausibility bounds. Wood SG runs from about 0.1 (balsa) to about 1.3 (lignum vitae) in the Wood
// Handbook's tables; the bounds leave room for resin-filled or mineral-streaked shop samples.
const SG_MIN = 0.05;
const SG_MAX = 1.5;
// A liquid monomer blend or a cured polymer outside 0.5–2.5 g/cm³ is almost surely a typing or unit error.
const RESIN_DENSITY_MIN = 0.5;
const RESIN_DENSITY_MAX = 2.5;
// Heat-cure resins of this trade cure at about 93–121 °C (common practice, no published source);
// outside 40–200 °C a value is a unit slip (°F typed as °C) rather than a real window.
export const CURE_TEMP_MIN_C = 40;
export const CURE_TEMP_MAX_C = 200;
/** 200–250 °F, the window as the trade states it, in °C without rounding (93.33… to 121.11… °C). */
export const DEFAULT_CURE_WINDOW_C = { min: CURE_TEMPERATURE_RANGE_C[0], max: CURE_TEMPERATURE_RANGE_C[1] } as const;
/** A lot this many days or fewer from its expiry date is flagged as expiring soon. */
export const LOT_EXPIRING_SOON_DAYS = 30;

/** `?sort=` limited to the named fields, optionally prefixed with - for descending. */
export function sortOf(fields: readonly string[]) {
  return z
    .string()
    .max(40)
    .refine((v) => fields.includes(v.replace(/^-/, '')), { message: `sort is one of ${fields.join(', ')} (prefix - for descending)` })
    .optional();
}

const text = (max: number, what: string) => z.string().trim().min(1, `Enter ${what}`).max(max, `Use at most ${max} characters`);
const optionalNotes = z.string().trim().max(2000, 'Use at most 2000 characters').nullable().optional();

const sg = (what: string) =>
  z
    .number({ error: `${what} must be a number` })
    .min(SG_MIN, `${what} below ${SG_MIN} is not a wood`)
    .max(SG_MAX, `${what} above ${SG_MAX} is not a wood`);

const speciesFields = {
  commonName: text(120, 'the common name'),
  botanicalName: text(160, 'the botanical name'),
  basicSg: sg('Basic specific gravity').nullable().optional(),
  sg12: sg('Specific gravity at 12 % MC').nullable().optional(),
  sideHardnessN: z
    .number({ error: 'Side hardness must be a number (newtons)' })
    .min(100, 'Side hardness below 100 N is not plausible for wood')
    .max(40000, 'Side hardness above 40 000 N is not plausible for wood')
    .nullable()
    .optional(),
  measuredDensityKgM3: z
    .number({ error: 'Measured density must be a number (kg/m³)' })
    .min(50, 'Measured density below 50 kg/m³ is not plausible')
    .max(1600, 'Measured density above 1600 kg/m³ is not plausible')
    .nullable()
    .optional(),
  measuredMoisturePct: z
    .number({ error: 'Measured moisture content must be a number (%)' })
    .min(0, 'Moisture content cannot be negative')
    .max(250, 'Moisture content above 250 % is not plausible')
    .nullable()
    .optional(),
  sgCoefficientOfVariation: z
    .number({ error: 'Coefficient of variation must be a number (fraction)' })
    .min(0.005, 'Give the coefficient of variation as a fraction, e.g. 0.10')
    .max(0.5, 'Give the coefficient of variation as a fraction, e.g. 0.10')
    .nullable()
    .optional(),
  source: text(400, 'the source (a citation, or who measured it and how)'),
  origin: z.enum(SPECIES_ORIGINS, { error: `origin is one of ${SPECIES_ORIGINS.join(', ')}` }),
  notes: optionalNotes,
};

interface SpeciesShape {
  origin?: (typeof SPECIES_ORIGINS)[number];
  basicSg?: number | null;
  sg12?: number | null;
  measuredDensityKgM3?: number | null;
  measuredMoisturePct?: number | null;
}

/**
 * Cross-field rules of a species row, shared by create (on the body) and update (on the merged row).
 * Returns field errors, empty when the row is coherent.
 */
export function speciesRowProblems(row: SpeciesShape): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  if (row.origin === 'handbook' && row.basicSg == null && row.sg12 == null) {
    out.basicSg = ['A handbook row needs the basic SG or the SG at 12 % MC'];
  }
  if (row.origin === 'shop-measured' && row.measuredDensityKgM3 == null) {
    out.measuredDensityKgM3 = ['A shop-measured row needs its measured density'];
  }
  if (row.measuredDensityKgM3 != null && row.measuredMoisturePct == null) {
    out.measuredMoisturePct = ['Give the moisture content at which the density was measured'];
  }
  // Density data that describe no possible wood (denser than cell-wall substance once dry, or wetter than
  // every void full of water) would leave the coupons' plausibility check without a reference.
  const impossible = (field: keyof SpeciesShape, f: () => unknown) => {
    try {
      f();
    } catch (e) {
      if (!(e instanceof DomainError)) throw e;
      out[field] ??= [`This describes no possible wood: ${e.message}`];
    }
  };
  if (row.basicSg != null) impossible('basicSg', () => specificGravityAtMoisture(row.basicSg as number, 0));
  if (row.sg12 != null) impossible('sg12', () => basicSpecificGravity(row.sg12 as number, 12));
  if (row.measuredDensityKgM3 != null && row.measuredMoisturePct != null) {
    const m = row.measuredMoisturePct;
    impossible('measuredDensityKgM3', () => basicSpecificGravity((row.measuredDensityKgM3 as number) / (1000 * (1 + m / 100)), m));
  }
  // SG at 12 % is oven-dry mass over the shrunken 12 % volume, so it can never be below the basic SG
  // (oven-dry mass over the larger green volume).
  if (row.basicSg != null && row.sg12 != null && row.sg12 < row.basicSg) {
    out.sg12 = ['SG at 12 % MC cannot be below the basic SG (the 12 % volume is the smaller one)'];
  }
  return out;
}

function refineWith<T extends SpeciesShape | ResinShape>(check: (row: T) => Record<string, string[]>) {
  return (row: T, ctx: z.RefinementCtx) => {
    for (const [field, messages] of Object.entries(check(row))) {
      for (const message of messages) ctx.addIssue({ code: 'custom', path: [field], message });
    }
  };
}

export const createSpeciesSchema = z.strictObject(speciesFields).superRefine(refineWith<SpeciesShape>(speciesRowProblems));
export type CreateSpeciesInput = z.infer<typeof createSpeciesSchema>;

export const updateSpeciesSchema = z
  .strictObject(speciesFields)
  .partial()
  .refine((v) => Object.keys(v).length > 0, { message: 'Change at least one field' });
export type UpdateSpeciesInput = z.infer<typeof updateSpeciesSchema>;

export const speciesSchema = z.object({
  id: z.number().int(),
  commonName: z.string(),
  botanicalName: z.string(),
  basicSg: z.number().nullable(),
  sg12: z.number().nullable(),
  sideHardnessN: z.number().nullable(),
  measuredDensityKgM3: z.number().nullable(),
  measuredMoisturePct: z.number().nullable(),
  sgCoefficientOfVariation: z.number().nullable(),
  source: z.string(),
  origin: z.enum(SPECIES_ORIGINS),
  notes: z.string().nullable(),
  createdAt: z.string(),
});
export type Species = z.infer<typeof speciesSchema>;
export const speciesListSchema = listResponseSchema(speciesSchema);
export const speciesResponseSchema = z.object({ species: speciesSchema });

export const SPECIES_SORTS = ['commonName', 'botanicalName', 'basicSg', 'sg12', 'sideHardnessN', 'createdAt'] as const;
export const speciesListQuerySchema = listQuerySchema.extend({
  sort: sortOf(SPECIES_SORTS),
  q: z.string().trim().max(80, 'Use at most 80 characters').optional(),
  origin: z.enum(SPECIES_ORIGINS, { error: `origin is one of ${SPECIES_ORIGINS.join(', ')}` }).optional(),
});
export type SpeciesListQuery = z.infer<typeof speciesListQuerySchema>;

// ---------------------------------------------------------------- resins

const resinDensity = (what: string) =>
  z
    .number({ error: `${what} must be a number (g/cm³)` })
    .min(RESIN_DENSITY_MIN, `${what} below ${RESIN_DENSITY_MIN} g/cm³ is not plausible for a resin`)
    .max(RESIN_DENSITY_MAX, `${what} above ${RESIN_DENSITY_MAX} g/cm³ is not plausible for a resin`);
const cureTemp = (what: string) =>
  z
    .number({ error: `${what} must be a number (°C)` })
    .min(CURE_TEMP_MIN_C, `${what} below ${CURE_TEMP_MIN_C} °C is not a heat cure (was it typed in °F?)`)
    .max(CURE_TEMP_MAX_C, `${what} above ${CURE_TEMP_MAX_C} °C is not plausible (was it typed in °F?)`);

const resinFields = {
  name: text(80, 'the name the shop uses for this resin'),
  kind: text(80, 'the kind of resin (e.g. methacrylate monomer blend)'),
  liquidDensityGcm3: resinDensity('Liquid density'),
  curedDensityGcm3: resinDensity('Cured density'),
  cureMinC: cureTemp('Lowest cure temperature').optional(),
  cureMaxC: cureTemp('Highest cure temperature').optional(),
  /** Omitted: the shop's lot shelf-life setting at the time the resin is entered. */
  shelfLifeDays: z
    .number({ error: 'Shelf life must be a number of days' })
    .int('Shelf life is a whole number of days')
    .min(1, 'Shelf life is at least 1 day')
    .max(3650, 'Shelf life above 10 years is not plausible')
    .optional(),
  notes: optionalNotes,
};

interface ResinShape {
  cureMinC?: number;
  cureMaxC?: number;
}

export function resinRowProblems(row: ResinShape): Record<string, string[]> {
  const min = row.cureMinC ?? DEFAULT_CURE_WINDOW_C.min;
  const max = row.cureMaxC ?? DEFAULT_CURE_WINDOW_C.max;
  if (min >= max) return { cureMaxC: [`The highest cure temperature must be above the lowest (${Math.round(min * 10) / 10} °C)`] };
  return {};
}

export const createResinSchema = z.strictObject(resinFields).superRefine(refineWith<ResinShape>(resinRowProblems));
export type CreateResinInput = z.infer<typeof createResinSchema>;

export const updateResinSchema = z
  .strictObject(resinFields)
  .partial()
  .refine((v) => Object.keys(v).length > 0, { message: 'Change at least one field' });
export type UpdateResinInput = z.infer<typeof updateResinSchema>;

export const resinSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  kind: z.string(),
  liquidDensityGcm3: z.number(),
  curedDensityGcm3: z.number(),
  cureMinC: z.number(),
  cureMaxC: z.number(),
  shelfLifeDays: z.number().int(),
  notes: z.string().nullable(),
  createdAt: z.string(),
  /** Lots of this resin that are active and not past their shelf life. */
  usableLots: z.number().int(),
});
export type Resin = z.infer<typeof resinSchema>;
export const resinListSchema = listResponseSchema(resinSchema);
export const resinResponseSchema = z.object({ resin: resinSchema });

export const RESIN_SORTS = ['name', 'kind', 'createdAt'] as const;
export const resinListQuerySchema = listQuerySchema.extend({
  sort: sortOf(RESIN_SORTS),
  q: z.string().trim().max(80, 'Use at most 80 characters').optional(),
});
export type ResinListQuery = z.infer<typeof resinListQuerySchema>;

// ---------------------------------------------------------------- resin lots

const isoDateOrTime = z.union([z.iso.date(), z.iso.datetime({ offset: true })], {
  error: 'Give the date as YYYY-MM-DD or an ISO timestamp',
});

const lotFields = {
  code: z
    .string()
    .trim()
    .min(1, 'Enter the lot code')
    .max(40, 'Use at most 40 characters')
    .regex(/^[A-Za-z0-9][A-Za-z0-9 ._/-]*$/, 'Use letters, digits, spaces and . _ / - in the lot code'),
  activatedAt: isoDateOrTime,
  catalystNotes: z.string().trim().max(500, 'Use at most 500 characters').nullable().optional(),
  dyeNotes: z.string().trim().max(500, 'Use at most 500 characters').nullable().optional(),
  volumeMl: z
    .number({ error: 'Volume must be a number (mL)' })
    .positive('Volume must be above zero')
    .max(1_000_000, 'Volume above 1000 L is not plausible for a shop lot'),
  reuseCount: z
    .number({ error: 'Reuse count must be a number' })
    .int('Reuse count is a whole number')
    .min(0, 'Reuse count cannot be negative')
    .max(1000, 'Reuse count above 1000 is not plausible'),
  status: z.enum(LOT_STATUSES, { error: `status is one of ${LOT_STATUSES.join(', ')}` }),
  notes: optionalNotes,
};

export const createResinLotSchema = z.strictObject({
  resinId: z.number({ error: 'Pick the resin' }).int().positive('Pick the resin'),
  ...lotFields,
  reuseCount: lotFields.reuseCount.optional(),
  status: lotFields.status.optional(),
});
export type CreateResinLotInput = z.infer<typeof createResinLotSchema>;

export const updateResinLotSchema = z
  .strictObject({
    ...lotFields,
    /** Why the lot changed, kept in the audit log (e.g. "drained back after run R-12"). */
    reason: z.string().trim().min(1, 'Say why, or leave the reason out').max(500, 'Use at most 500 characters').optional(),
    /** The reuse count the client saw; when it differs from the stored one, someone else counted a reuse meanwhile. */
    expectedReuseCount: z.number().int().min(0).optional(),
  })
  .partial()
  .refine((v) => Object.keys(v).some((k) => k !== 'reason' && k !== 'expectedReuseCount'), { message: 'Change at least one field' });
export type UpdateResinLotInput = z.infer<typeof updateResinLotSchema>;

export const resinLotSchema = z.object({
  id: z.number().int(),
  resinId: z.number().int(),
  resinName: z.string(),
  code: z.string(),
  activatedAt: z.string(),
  catalystNotes: z.string().nullable(),
  dyeNotes: z.string().nullable(),
  volumeMl: z.number(),
  reuseCount: z.number().int(),
  status: z.enum(LOT_STATUSES),
  notes: z.string().nullable(),
  createdAt: z.string(),
  /** Whole days since activation. */
  ageDays: z.number().int(),
  shelfLifeDays: z.number().int(),
  /** Calendar date (YYYY-MM-DD, UTC) after which the lot is past its shelf life. */
  expiresOn: z.string(),
  expired: z.boolean(),
  expiringSoon: z.boolean(),
  /** Distinct species of the coupons in runs that used this lot, so a pale wood is not put in a stained lot. */
  speciesThroughLot: z.array(z.string()),
});
export type ResinLot = z.infer<typeof resinLotSchema>;
export const resinLotListSchema = listResponseSchema(resinLotSchema);
export const resinLotResponseSchema = z.object({ lot: resinLotSchema });

export const RESIN_LOT_SORTS = ['activatedAt', 'code', 'createdAt'] as const;
export const resinLotListQuerySchema = listQuerySchema.extend({
  sort: sortOf(RESIN_LOT_SORTS),
  resinId: z.coerce.number().int().positive().optional(),
  status: z.enum(LOT_STATUSES, { error: `status is one of ${LOT_STATUSES.join(', ')}` }).optional(),
});
export type ResinLotListQuery = z.infer<typeof resinLotListQuerySchema>;

const DAY_MS = 24 * 3600 * 1000;

/**
 * Where a lot stands against its shelf life. Activated resin keeps about a year stored cool (common
 * practice, no published source); the resin's own shelf life, else the shop's setting, applies.
 * Expired means older than the shelf life in whole days; expiring soon means within
 * LOT_EXPIRING_SOON_DAYS of that.
 */
export function lotShelfLife(activatedAt: string, shelfLifeDays: number, now: Date) {
  const start = Date.parse(activatedAt);
  const ageDays = Math.floor((now.getTime() - start) / DAY_MS);
  const expiresOn = new Date(start + shelfLifeDays * DAY_MS).toISOString().slice(0, 10);
  const expired = ageDays > shelfLifeDays;
  const expiringSoon = !expired && shelfLifeDays - ageDays <= LOT_EXPIRING_SOON_DAYS;
  return { ageDays, shelfLifeDays, expiresOn, expired, expiringSoon };
}
