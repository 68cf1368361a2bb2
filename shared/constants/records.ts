/** Enumerations of the shop's records, defined once for zod contracts and Drizzle columns alike. */

export const SPECIES_ORIGINS = ['handbook', 'shop-measured'] as const;
export type SpeciesOrigin = (typeof SPECIES_ORIGINS)[number];

export const LOT_STATUSES = ['active', 'retired', 'spent'] as const;
export type LotStatus = (typeof LOT_STATUSES)[number];

export const TRIAL_STATUSES = ['planning', 'running', 'analysing', 'closed'] as const;
export type TrialStatus = (typeof TRIAL_STATUSES)[number];

export const COUPON_ROLES = ['treated', 'control'] as const;
export type CouponRole = (typeof COUPON_ROLES)[number];

/** Stages at which a coupon is weighed. */
export const WEIGHING_STAGES = ['dry', 'soaked', 'cured', 'wet-test', 'drying-check'] as const;
export type WeighingStage = (typeof WEIGHING_STAGES)[number];

/**
 * Where a reading came from, stored on every weighing and check: typed on a coupon's page (`entry`),
 * saved from the entry grid (`grid`), written by a CSV import (`import:<id>`), or the new row of a
 * correction (`correction`).
 */
export const MEASUREMENT_SOURCE_KINDS = ['entry', 'grid', 'import', 'correction'] as const;
export type MeasurementSource = 'entry' | 'grid' | 'correction' | `import:${number}`;
export const MEASUREMENT_SOURCE_PATTERN = /^(entry|grid|correction|import:[1-9][0-9]*)$/;

export const CHECK_KINDS = ['dimension', 'hardness', 'moisture'] as const;
export type CheckKind = (typeof CHECK_KINDS)[number];

/** Stages at which a dimension, hardness or moisture check is taken. */
export const CHECK_STAGES = ['dry', 'cured', 'wet-test'] as const;
export type CheckStage = (typeof CHECK_STAGES)[number];

/** Hardness scales are different tests; a reading is never converted from one to another. */
export const HARDNESS_SCALES = ['shore-d', 'janka-n', 'brinell-hb'] as const;
export type HardnessScale = (typeof HARDNESS_SCALES)[number];
export const HARDNESS_SCALE_LABELS: Record<HardnessScale, string> = {
  'shore-d': 'Shore D',
  'janka-n': 'Janka (N)',
  'brinell-hb': 'Brinell HB',
};

/** The chamber cycle, in order. */
export const RUN_STAGES = ['drying', 'vacuum', 'soak', 'drain', 'cure'] as const;
export type RunStage = (typeof RUN_STAGES)[number];

export const GAUGE_UNITS = ['inHg', 'kPa'] as const;
export type GaugeUnit = (typeof GAUGE_UNITS)[number];

export const PHOTO_KINDS = ['before', 'after', 'cut-section'] as const;
export type PhotoKind = (typeof PHOTO_KINDS)[number];
