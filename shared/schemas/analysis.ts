import { z } from 'zod';
import { COUPON_ROLES, HARDNESS_SCALES, SPECIES_ORIGINS } from '../constants/records';
import { listResponseSchema } from './common';

/**
 * Contracts of the analysis feature (Compare) and of saved views ("evidence").
 *
 * Every answer is computed from the per-coupon results table, one row per coupon with its current
 * readings and metrics; no request recomputes readings. The arithmetic is the domain core's
 * (shared/domain) through the pure functions in shared/analysis.
 */

const id = z.coerce.number().int().positive();
/** `?speciesId=3` or `?speciesId=3,5`: one id or several, comma-separated. */
const idList = z.preprocess((v) => {
  if (v === undefined || v === '' || v === null) return undefined;
  if (Array.isArray(v)) return v.flatMap((x) => String(x).split(','));
  if (typeof v === 'number') return [v];
  return String(v).split(',');
}, z.array(id).min(1).max(50).optional());
const dateText = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'Use a date as YYYY-MM-DD');
const thickness = z.coerce.number().min(0, 'Thickness is at least 0 mm').max(2000, 'Above 2000 mm is not a coupon');

/** The filters every analysis answer takes. Empty means "all". */
export const analysisFiltersObject = z.object({
  trialId: idList,
  conditionId: idList,
  speciesId: idList,
  /** Handbook species or the shop's own measured ones. */
  speciesOrigin: z.enum(SPECIES_ORIGINS).optional(),
  resinId: idList,
  lotId: idList,
  runId: idList,
  role: z.enum(COUPON_ROLES).optional(),
  sourceBoard: z.string().trim().min(1).max(120).optional(),
  thicknessMinMm: thickness.optional(),
  thicknessMaxMm: thickness.optional(),
  /**
   * When the coupons were treated, inclusive (UTC dates): the date their run's cure began, or its soak
   * when the cure is not recorded. Controls are untreated: they are kept when their trial has a coupon
   * treated in the range. Coupons not yet in a run have no treatment date and are left out.
   */
  from: dateText.optional(),
  to: dateText.optional(),
});
function checkRanges(
  v: { thicknessMinMm?: number | undefined; thicknessMaxMm?: number | undefined; from?: string | undefined; to?: string | undefined },
  ctx: z.RefinementCtx,
) {
  if (v.thicknessMinMm !== undefined && v.thicknessMaxMm !== undefined && v.thicknessMinMm > v.thicknessMaxMm) {
    ctx.addIssue({ code: 'custom', path: ['thicknessMaxMm'], message: 'The largest thickness is below the smallest' });
  }
  if (v.from !== undefined && v.to !== undefined && v.from > v.to) {
    ctx.addIssue({ code: 'custom', path: ['to'], message: 'The end date is before the start date' });
  }
}
export const analysisFiltersSchema = analysisFiltersObject.strict().superRefine(checkRanges);
export type AnalysisFilters = z.infer<typeof analysisFiltersSchema>;

/** Which oven-dry SG goes on the x axis: the coupon's own (mass over volume) or the species' handbook value. */
export const SG_BASES = ['measured', 'handbook'] as const;
export type SgBasis = (typeof SG_BASES)[number];

export const FIT_MODELS = ['density', 'thickness', 'density+thickness'] as const;
export type FitModel = (typeof FIT_MODELS)[number];

/** Metrics a two-group comparison can be made on (names of columns of the results table). */
export const COMPARE_METRICS = ['wpgPct', 'resinLoadingKgM3', 'voidFillPct', 'hardness', 'swellingPct', 'asePct', 'wrePct'] as const;
export type CompareMetric = (typeof COMPARE_METRICS)[number];
export const COMPARE_METRIC_LABELS: Record<CompareMetric, { label: string; unit: string }> = {
  wpgPct: { label: 'WPG', unit: '%' },
  resinLoadingKgM3: { label: 'resin loading', unit: 'kg/m³' },
  voidFillPct: { label: 'void fill', unit: '%' },
  hardness: { label: 'hardness', unit: '' },
  swellingPct: { label: 'swelling', unit: '%' },
  asePct: { label: 'anti-swell efficiency (ASE)', unit: '%' },
  wrePct: { label: 'water-repellent effectiveness (WRE)', unit: '%' },
};

/** `GET /api/analysis/overview` and `/summary`: filters plus the SG basis. */
export const analysisQuerySchema = analysisFiltersObject
  .extend({ sgBasis: z.enum(SG_BASES).default('measured') })
  .strict()
  .superRefine(checkRanges);
export type AnalysisQuery = z.infer<typeof analysisQuerySchema>;

export const fitQuerySchema = analysisFiltersObject
  .extend({ sgBasis: z.enum(SG_BASES).default('measured'), model: z.enum(FIT_MODELS).default('density') })
  .strict()
  .superRefine(checkRanges);

export const summaryQuerySchema = analysisFiltersObject
  .extend({
    sgBasis: z.enum(SG_BASES).default('measured'),
    /** Only `species,resin` is offered today; the parameter is kept so the URL says what it groups by. */
    groupBy: z.literal('species,resin').default('species,resin'),
  })
  .strict()
  .superRefine(checkRanges);

export const analysisCouponsQuerySchema = analysisFiltersObject
  .extend({
    page: z.coerce.number().int().min(1).default(1),
    pageSize: z.coerce.number().int().min(1).max(500).default(100),
  })
  .strict()
  .superRefine(checkRanges);

/** One side of a two-group comparison: the coupons (within the filters) that match every key given. */
export const groupSpecSchema = z
  .strictObject({
    label: z.string().trim().max(80).optional(),
    speciesId: z.number().int().positive().optional(),
    resinId: z.number().int().positive().optional(),
    lotId: z.number().int().positive().optional(),
    runId: z.number().int().positive().optional(),
    conditionId: z.number().int().positive().optional(),
    role: z.enum(COUPON_ROLES).optional(),
  })
  .refine((g) => Object.entries(g).some(([k, v]) => k !== 'label' && v !== undefined), { message: 'Pick at least one key for the group' });
export type GroupSpec = z.infer<typeof groupSpecSchema>;

export const compareRequestSchema = z.strictObject({
  filters: analysisFiltersSchema.default({}),
  a: groupSpecSchema,
  b: groupSpecSchema,
  metric: z.enum(COMPARE_METRICS).default('wpgPct'),
});
export type CompareRequest = z.infer<typeof compareRequestSchema>;

export const sampleSizeQuerySchema = z.strictObject({
  speciesId: id.optional(),
  resinId: id.optional(),
  /** The smallest difference in mean WPG worth detecting, percentage points. */
  differencePct: z.coerce.number().positive('Enter a difference above 0').max(500),
  /** Coupons per condition in the plan, to warn when fewer than needed. */
  planned: z.coerce.number().int().min(0).max(10000).optional(),
});

// ───────────────────────────── answers ─────────────────────────────

const num = z.number();
const nullableNum = z.number().nullable();
const interval = z.tuple([num, num]);

/** One coupon as the analysis sees it: keys and metrics from the results table. */
export const analysisCouponSchema = z.object({
  id: z.number().int(),
  tag: z.string(),
  trialId: z.number().int().nullable(),
  conditionId: z.number().int().nullable(),
  runId: z.number().int().nullable(),
  runCode: z.string().nullable(),
  speciesId: z.number().int(),
  speciesName: z.string(),
  speciesOrigin: z.enum(SPECIES_ORIGINS),
  resinId: z.number().int().nullable(),
  resinName: z.string().nullable(),
  /** Cured resin density, g/cm³, for the theoretical maximum. */
  resinDensityGcm3: nullableNum,
  lotId: z.number().int().nullable(),
  role: z.enum(COUPON_ROLES),
  sourceBoard: z.string().nullable(),
  thicknessMm: nullableNum,
  dryMassG: nullableNum,
  curedMassG: nullableNum,
  /** The coupon's own oven-dry SG (dry mass / dry volume). */
  drySg: nullableNum,
  /** The species' reference oven-dry SG (handbook or shop-measured). */
  referenceSg: nullableNum,
  referenceSgCov: nullableNum,
  wpgPct: nullableNum,
  resinLoadingKgM3: nullableNum,
  voidFillPct: nullableNum,
  maxWpgPct: nullableNum,
  swellingPct: nullableNum,
  /** Anti-swell efficiency against the controls, when swelling was measured on dimensions (volume basis). */
  asePct: nullableNum,
  /** Water-repellent effectiveness against the controls, when the soak was judged by mass (mass basis). */
  wrePct: nullableNum,
  hardnessValue: nullableNum,
  hardnessScale: z.enum(HARDNESS_SCALES).nullable(),
  /** When the coupon was treated (YYYY-MM-DD, UTC): its run's cure date, else its soak date; null when not in a run. */
  treatedOn: z.string().nullable(),
  /** Why a metric is blank, as the results table records it (metric → reason). */
  blankReasons: z.record(z.string(), z.string()),
});
export type AnalysisCoupon = z.infer<typeof analysisCouponSchema>;

export const excludedCouponSchema = z.object({ id: z.number().int(), tag: z.string(), reasons: z.array(z.string()) });
export type ExcludedCoupon = z.infer<typeof excludedCouponSchema>;

export const summaryStatsSchema = z.object({ n: z.number().int(), mean: num, sd: nullableNum, ci95: interval.nullable() });
export type SummaryStats = z.infer<typeof summaryStatsSchema>;

export const groupRowSchema = z.object({
  speciesId: z.number().int(),
  speciesName: z.string(),
  resinId: z.number().int().nullable(),
  resinName: z.string().nullable(),
  nCoupons: z.number().int(),
  /** Distinct named source boards; coupons with no board named are counted in nNoBoard. */
  nBoards: z.number().int(),
  nNoBoard: z.number().int(),
  wpg: summaryStatsSchema.nullable(),
  resinLoading: summaryStatsSchema.nullable(),
  voidFill: summaryStatsSchema.nullable(),
  /** Treated mean / control mean, same species and hardness scale. */
  hardnessGain: z.object({ ratio: num, scale: z.enum(HARDNESS_SCALES), nTreated: z.number().int(), nControl: z.number().int() }).nullable(),
  /** Anti-swell efficiency (volume basis). */
  ase: summaryStatsSchema.nullable(),
  /** Water-repellent effectiveness (mass basis); never pooled with ASE. */
  wre: summaryStatsSchema.nullable(),
});
export type GroupRow = z.infer<typeof groupRowSchema>;

export const coefficientSchema = z.object({ name: z.string(), estimate: num, se: num, ci95: interval });
export const fitSchema = z.object({
  model: z.enum(FIT_MODELS),
  n: z.number().int(),
  coefficients: z.array(coefficientSchema),
  r2: num,
  residualSd: num,
  /** The fit in plain words, for the caption and the text alternative. */
  sentence: z.string(),
  /** Line with its 95 % confidence band for the mean (single-predictor models). */
  band: z.array(z.object({ x: num, fit: num, lo: num, hi: num })),
});
export type Fit = z.infer<typeof fitSchema>;

export const outlierSchema = z.object({
  id: z.number().int(),
  tag: z.string(),
  kind: z.enum(['residual', 'sg']),
  value: num,
  reason: z.string(),
});
export type Outlier = z.infer<typeof outlierSchema>;

/** A point on a plot; `i` is the coupon id the hover names and the click opens. */
export const plotPointSchema = z.object({
  id: z.number().int(),
  tag: z.string(),
  species: z.string(),
  resin: z.string(),
  x: num,
  y: num,
});
export type PlotPoint = z.infer<typeof plotPointSchema>;

export const pointSetSchema = z.object({
  points: z.array(plotPointSchema),
  /** How many coupons the plot stands for, and how many are drawn. */
  total: z.number().int(),
  shown: z.number().int(),
  /** 'all' or 'thinned' (a systematic sample within each species × resin, outliers always kept). */
  method: z.enum(['all', 'thinned']),
});
export type PointSet = z.infer<typeof pointSetSchema>;

export const theoreticalMaxSchema = z.object({
  resinName: z.string(),
  resinDensityGcm3: num,
  cellWallDensityGcm3: num,
  curve: z.array(z.object({ x: num, y: num })),
  /** Fraction of the voids filled that the plotted data imply (least squares through the origin of WPG on max WPG). */
  impliedFill: z.object({ fraction: num, ci95: interval, n: z.number().int() }).nullable(),
});

export const overviewSchema = z.object({
  sgBasis: z.enum(SG_BASES),
  counts: z.object({ matched: z.number().int(), treatedIncluded: z.number().int(), controls: z.number().int(), excluded: z.number().int() }),
  groups: z.array(groupRowSchema),
  excluded: z.array(excludedCouponSchema),
  densityFit: fitSchema.nullable(),
  thicknessFit: fitSchema.nullable(),
  multipleFit: fitSchema.nullable(),
  /** Why a fit is missing (too few coupons, no spread). */
  fitNotes: z.array(z.string()),
  theoreticalMax: z.array(theoreticalMaxSchema),
  outliers: z.array(outlierSchema),
  plots: z.object({
    wpgVsSg: pointSetSchema,
    wpgVsThickness: pointSetSchema,
    residuals: pointSetSchema,
    hardness: z.array(
      z.object({
        id: z.number().int(),
        tag: z.string(),
        species: z.string(),
        resin: z.string(),
        role: z.enum(COUPON_ROLES),
        scale: z.enum(HARDNESS_SCALES),
        value: num,
      }),
    ),
    swelling: z.array(
      z.object({
        id: z.number().int(),
        tag: z.string(),
        species: z.string(),
        resin: z.string(),
        role: z.enum(COUPON_ROLES),
        swellingPct: num,
        asePct: nullableNum,
        wrePct: nullableNum,
      }),
    ),
  }),
});
export type Overview = z.infer<typeof overviewSchema>;

export const compareSideSchema = z.object({ label: z.string(), n: z.number().int(), nBoards: z.number().int(), mean: num, sd: num });
export const compareResultSchema = z.object({
  metric: z.enum(COMPARE_METRICS),
  unit: z.string(),
  a: compareSideSchema,
  b: compareSideSchema,
  /** hedgesG includes the small-sample correction hedgesCorrection (J) and is standardized by pooledSd. */
  welch: z.object({ t: num, df: num, p: num, meanDiff: num, ci95: interval, hedgesG: num, hedgesCorrection: num, pooledSd: num }).nullable(),
  /** Same test on source-board means, when boards repeat within a group. */
  boardMeans: z
    .object({
      nA: z.number().int(),
      nB: z.number().int(),
      t: num,
      df: num,
      p: num,
      meanDiff: num,
      ci95: interval,
      hedgesG: num,
      hedgesCorrection: num,
      pooledSd: num,
    })
    .nullable(),
  /** Which result to read: 'coupons' when each coupon has its own board, else 'board-means'. */
  trust: z.enum(['coupons', 'board-means']),
  sentence: z.string(),
  warnings: z.array(z.string()),
  effectSizeNote: z.string(),
});
export type CompareResult = z.infer<typeof compareResultSchema>;

export const expectedCouponSchema = z.object({
  id: z.number().int(),
  tag: z.string(),
  species: z.string(),
  resin: z.string(),
  actualWpgPct: nullableNum,
  expectedWpgPct: nullableNum,
  /** (actual − expected)/expected × 100. */
  differencePct: nullableNum,
  note: z.string().nullable(),
});
export const runExpectedSchema = z.object({
  runId: z.number().int(),
  coupons: z.array(expectedCouponSchema),
  /** The fill fractions used, per species × resin, from the shop's other runs. */
  basis: z.array(z.object({ species: z.string(), resin: z.string(), fillFraction: num, ci95: interval, nHistory: z.number().int() })),
  run: z.object({
    n: z.number().int(),
    meanDifferencePct: nullableNum,
    ci95: interval.nullable(),
    status: z.enum(['short', 'as-expected', 'above', 'no-history', 'no-data']),
    message: z.string(),
  }),
});
export type RunExpected = z.infer<typeof runExpectedSchema>;

export const sampleSizeSchema = z.object({
  nPerCondition: z.number().int(),
  differencePct: num,
  sd: num,
  sdSource: z.enum(['shop', 'default']),
  sdNote: z.string(),
  power: num,
  alpha: num,
  warning: z.string().nullable(),
});
export type SampleSize = z.infer<typeof sampleSizeSchema>;

export const analysisCouponsResponseSchema = listResponseSchema(analysisCouponSchema).extend({ excluded: z.array(excludedCouponSchema) });

// ───────────────────────────── evidence (saved views) ─────────────────────────────

/**
 * The view a user saves: the filters, the SG basis and optionally a two-group comparison. The server
 * computes the snapshot itself from the results table, so a saved number is always one the server made.
 */
export const evidenceViewSchema = z.strictObject({
  filters: analysisFiltersSchema.default({}),
  sgBasis: z.enum(SG_BASES).default('measured'),
  compare: z.strictObject({ a: groupSpecSchema, b: groupSpecSchema, metric: z.enum(COMPARE_METRICS).default('wpgPct') }).optional(),
});
export type EvidenceView = z.infer<typeof evidenceViewSchema>;

export const createEvidenceSchema = z.strictObject({
  title: z.string().trim().min(3, 'Give the view a title (at least 3 characters)').max(160),
  note: z.string().trim().max(2000).optional(),
  view: evidenceViewSchema,
});
export type CreateEvidenceInput = z.infer<typeof createEvidenceSchema>;

/** Plot description that a findings page or the wiki can redraw without asking the analysis again. */
export const plotSpecSchema = z.object({
  kind: z.literal('wpg-vs-sg'),
  x: z.object({ label: z.string() }),
  y: z.object({ label: z.string() }),
  /** Colour by species, symbol by resin; the palette and symbols the Compare screen uses. */
  colorBy: z.literal('species'),
  symbolBy: z.literal('resin'),
  caption: z.string(),
});

/**
 * The frozen snapshot. Its numbers never change after saving; `fingerprint` is a hash of `numbers`,
 * so "a newer answer exists" means the same view computed now has a different fingerprint.
 */
export const evidenceSnapshotSchema = z.object({
  version: z.literal(1),
  computedAt: z.string(),
  numbers: z.object({ overview: overviewSchema, compare: compareResultSchema.nullable() }),
  plot: z.object({ spec: plotSpecSchema, data: pointSetSchema }),
});
export type EvidenceSnapshot = z.infer<typeof evidenceSnapshotSchema>;

export const evidenceSchema = z.object({
  id: z.number().int(),
  title: z.string(),
  note: z.string().nullable(),
  view: evidenceViewSchema,
  snapshot: evidenceSnapshotSchema,
  fingerprint: z.string(),
  createdAt: z.string(),
  createdBy: z.object({ id: z.number().int(), name: z.string() }).nullable(),
});
export type Evidence = z.infer<typeof evidenceSchema>;

export const evidenceResponseSchema = z.object({
  evidence: evidenceSchema,
  /** Set when the same view computed now gives other numbers (readings corrected or added since). */
  newerAnswer: z.object({ exists: z.boolean(), currentFingerprint: z.string(), checkedAt: z.string() }),
});
export type EvidenceResponse = z.infer<typeof evidenceResponseSchema>;

export const evidenceSummarySchema = z.object({ id: z.number().int(), title: z.string(), createdAt: z.string(), fingerprint: z.string() });
export const evidenceListSchema = listResponseSchema(evidenceSummarySchema);

/** `GET /api/analysis/summary`: the group table of the overview alone. */
export const analysisSummaryResponseSchema = z.object({
  groupBy: z.literal('species,resin'),
  groups: overviewSchema.shape.groups,
  counts: overviewSchema.shape.counts,
  excluded: z.array(excludedCouponSchema),
});
/** `GET /api/analysis/fit`: one model's fit with its points, notes and outliers. */
export const analysisFitResponseSchema = z.object({
  fit: fitSchema.nullable(),
  notes: z.array(z.string()),
  excluded: z.array(excludedCouponSchema),
  theoreticalMax: z.array(theoreticalMaxSchema),
  points: pointSetSchema,
  outliers: z.array(outlierSchema),
});
