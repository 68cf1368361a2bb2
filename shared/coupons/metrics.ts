import type { CheckKind, CheckStage, CouponRole, HardnessScale, WeighingStage } from '../constants/records';
// Module paths, not the domain barrel: the browser loads this for the entry grid, and the barrel
// would bring the statistics libraries with it.
import { DomainError } from '../domain/errors';
import { moistureContent } from '../domain/moisture';
import {
  antiSwellEfficiency,
  cureLoss,
  maxWeightPercentGain,
  resinLoading,
  resinWeightPercentGain,
  voidFill,
  volumetricChange,
  weightPercentGain,
} from '../domain/resin';

/** A mass reading as the grid or the server holds it (current readings only: not superseded, not deleted). */
export interface WeighingReading {
  stage: WeighingStage;
  massG: number;
  measuredAt: string;
}

export interface CheckReading {
  kind: CheckKind;
  stage: CheckStage;
  measuredAt: string;
  lengthMm?: number | null;
  widthMm?: number | null;
  thicknessMm?: number | null;
  volumeCm3?: number | null;
  hardnessValue?: number | null;
  hardnessScale?: HardnessScale | null;
  moisturePct?: number | null;
}

export interface CouponMetricsInput {
  role: CouponRole;
  weighings: readonly WeighingReading[];
  checks: readonly CheckReading[];
  /** The resin the coupon went through (coupon → run → lot → resin), for void fill and the maximum uptake. */
  resin?: { curedDensityGcm3: number | null } | null;
}

export const SWELLING_BASES = ['volume', 'mass'] as const;
export type SwellingBasis = (typeof SWELLING_BASES)[number];
export const MC_SOURCES = ['moisture-check', 'drying-check-mass'] as const;

export interface CouponMetrics {
  dryMassG: number | null;
  soakedMassG: number | null;
  curedMassG: number | null;
  wetTestMassG: number | null;
  dryVolumeCm3: number | null;
  curedVolumeCm3: number | null;
  wetTestVolumeCm3: number | null;
  thicknessMm: number | null;
  /** Moisture content, % oven-dry basis. */
  mcPct: number | null;
  /** A meter reading (moisture check at the dry stage), or the first drying-check mass against the dry mass. */
  mcSource: (typeof MC_SOURCES)[number] | null;
  dryDensityKgM3: number | null;
  drySg: number | null;
  /** Weight percent gain after the cure. */
  wpgPct: number | null;
  /** Weight percent gain after the soak (wet uptake). */
  wetUptakePct: number | null;
  resinLoadingKgM3: number | null;
  /** Share of the void volume the cured resin fills, %. */
  voidFillPct: number | null;
  /** The most the cured resin could add if it filled every void, %. */
  maxWpgPct: number | null;
  cureLossPct: number | null;
  bulkingPct: number | null;
  /** Water-soak swelling: by volume when volumes were measured, else by mass gain. */
  swellingPct: number | null;
  swellingBasis: SwellingBasis | null;
  /** Latest hardness per stage and scale; scales are different tests and are never converted. */
  hardness: { stage: CheckStage; scale: HardnessScale; value: number }[];
  /** Metrics left blank because the readings contradict each other, with the reason. */
  problems: { metric: string; message: string }[];
}

/** The domain's refusals, in the words a technician at the bench would use. */
const PLAIN_WORDS: Partial<Record<DomainError['code'], string>> = {
  'mass-above-soaked': 'The cured mass is above the soaked mass; a blank does not gain resin in the oven, so one of the two weighings is off',
  'mass-below-dry': 'A later mass is below the dry mass; one of the weighings is off',
  'no-uptake': 'The soaked mass is not above the dry mass, so there is no uptake to lose in the cure',
  'sg-out-of-range': 'The dry mass over the dry volume is outside what wood can be; check the mass and the dimensions',
};

function latest<T extends { measuredAt: string }>(rows: readonly T[]): T | undefined {
  let best: T | undefined;
  for (const r of rows) if (!best || Date.parse(r.measuredAt) >= Date.parse(best.measuredAt)) best = r;
  return best;
}

/** The current mass at a stage: the latest reading there (drying checks pile up; the others are single). */
export function massAt(weighings: readonly WeighingReading[], stage: WeighingStage): number | null {
  return latest(weighings.filter((w) => w.stage === stage))?.massG ?? null;
}

/** Volume of a dimension check, cm³: an immersion volume when given, else length × width × thickness / 1000. */
export function checkVolumeCm3(c: CheckReading): number | null {
  if (c.volumeCm3 != null) return c.volumeCm3;
  if (c.lengthMm != null && c.widthMm != null && c.thicknessMm != null) return (c.lengthMm * c.widthMm * c.thicknessMm) / 1000;
  return null;
}

function dimensionAt(checks: readonly CheckReading[], stage: CheckStage): CheckReading | undefined {
  return latest(checks.filter((c) => c.kind === 'dimension' && c.stage === stage && checkVolumeCm3(c) !== null));
}

/**
 * Per-coupon computed metrics from its current readings, through the domain functions. A metric whose
 * inputs are missing is null; one whose inputs contradict each other (e.g. cured below dry) is null
 * with the domain's reason in `problems`, so a live grid can show the number or the reason.
 */
export function couponMetrics(input: CouponMetricsInput): CouponMetrics {
  const problems: CouponMetrics['problems'] = [];
  const attempt = (metric: string, f: () => number): number | null => {
    try {
      const v = f();
      return Number.isFinite(v) ? v : null;
    } catch (e) {
      if (e instanceof DomainError) {
        problems.push({ metric, message: PLAIN_WORDS[e.code] ?? e.message });
        return null;
      }
      throw e;
    }
  };
  const w = input.weighings;
  const dry = massAt(w, 'dry');
  const soaked = massAt(w, 'soaked');
  const cured = massAt(w, 'cured');
  const wet = massAt(w, 'wet-test');
  const dryDim = dimensionAt(input.checks, 'dry');
  const curedDim = dimensionAt(input.checks, 'cured');
  const wetDim = dimensionAt(input.checks, 'wet-test');
  const dryVol = dryDim ? checkVolumeCm3(dryDim) : null;
  const curedVol = curedDim ? checkVolumeCm3(curedDim) : null;
  const wetVol = wetDim ? checkVolumeCm3(wetDim) : null;
  const thickness = dryDim?.thicknessMm ?? curedDim?.thicknessMm ?? null;
  const resinDensity = input.resin?.curedDensityGcm3 ?? null;

  let mcPct: number | null = null;
  let mcSource: CouponMetrics['mcSource'] = null;
  const meter = latest(input.checks.filter((c) => c.kind === 'moisture' && c.stage === 'dry' && c.moisturePct != null));
  if (meter?.moisturePct != null) {
    mcPct = meter.moisturePct;
    mcSource = 'moisture-check';
  } else if (dry !== null) {
    // The first drying check against the final dry mass is the oven-dry method's moisture at the start.
    const first = [...w.filter((x) => x.stage === 'drying-check')].sort((a, b) => Date.parse(a.measuredAt) - Date.parse(b.measuredAt))[0];
    if (first) {
      mcPct = attempt('mcPct', () => moistureContent(first.massG, dry));
      if (mcPct !== null) mcSource = 'drying-check-mass';
    }
  }

  const drySg = dry !== null && dryVol !== null && dryVol > 0 && dry > 0 ? dry / dryVol : null;
  const dryDensityKgM3 = drySg === null ? null : drySg * 1000;
  // Resin only adds mass: a cured or soaked mass below the dry mass blanks the metric with its reason.
  const wpgPct = dry !== null && cured !== null ? attempt('wpgPct', () => resinWeightPercentGain(dry, cured)) : null;
  const wetUptakePct = dry !== null && soaked !== null ? attempt('wetUptakePct', () => resinWeightPercentGain(dry, soaked)) : null;
  const resinLoadingKgM3 = dry !== null && cured !== null && dryVol !== null ? attempt('resinLoadingKgM3', () => resinLoading(dry, cured, dryVol)) : null;
  const vf =
    dry !== null && cured !== null && dryVol !== null && resinDensity !== null
      ? attempt('voidFillPct', () => voidFill(dry, cured, dryVol, resinDensity))
      : null;
  const maxWpgPct = drySg !== null && resinDensity !== null ? attempt('maxWpgPct', () => maxWeightPercentGain(drySg, resinDensity)) : null;
  const cureLossPct = dry !== null && soaked !== null && cured !== null ? attempt('cureLossPct', () => cureLoss(dry, soaked, cured)) : null;
  const bulkingPct = dryVol !== null && curedVol !== null ? attempt('bulkingPct', () => volumetricChange(dryVol, curedVol)) : null;

  // Treated pieces swell from their cured state, controls from their dry state.
  let swellingPct: number | null = null;
  let swellingBasis: SwellingBasis | null = null;
  const baseVol = input.role === 'treated' ? curedVol : dryVol;
  const baseMass = input.role === 'treated' ? cured : dry;
  if (wetVol !== null && baseVol !== null) {
    swellingPct = attempt('swellingPct', () => volumetricChange(baseVol, wetVol));
    if (swellingPct !== null) swellingBasis = 'volume';
  } else if (wet !== null && baseMass !== null) {
    swellingPct = attempt('swellingPct', () => weightPercentGain(baseMass, wet));
    if (swellingPct !== null) swellingBasis = 'mass';
  }

  const hardness: CouponMetrics['hardness'] = [];
  const seen = new Set<string>();
  const hardRows = input.checks
    .filter((c) => c.kind === 'hardness' && c.hardnessValue != null && c.hardnessScale != null)
    .sort((a, b) => Date.parse(b.measuredAt) - Date.parse(a.measuredAt));
  for (const c of hardRows) {
    const key = `${c.stage}|${c.hardnessScale}`;
    if (seen.has(key)) continue;
    seen.add(key);
    hardness.push({ stage: c.stage, scale: c.hardnessScale as HardnessScale, value: c.hardnessValue as number });
  }

  return {
    dryMassG: dry,
    soakedMassG: soaked,
    curedMassG: cured,
    wetTestMassG: wet,
    dryVolumeCm3: dryVol,
    curedVolumeCm3: curedVol,
    wetTestVolumeCm3: wetVol,
    thicknessMm: thickness,
    mcPct,
    mcSource,
    dryDensityKgM3,
    drySg,
    wpgPct,
    wetUptakePct,
    resinLoadingKgM3,
    voidFillPct: vf === null ? null : vf * 100,
    maxWpgPct,
    cureLossPct,
    bulkingPct,
    swellingPct,
    swellingBasis,
    hardness,
    problems,
  };
}

/**
 * What the efficiency against the controls is called on each basis. On dimensions it is the anti-swell
 * efficiency (ASE); on mass it measures how much less water the piece took up, the water-repellent
 * effectiveness (WRE) — not an anti-swell efficiency, since mass says nothing about swelling.
 * Rowell & Ellis (1978) Wood and Fiber 10(2):104–111 use both terms this way (from memory).
 */
export const ANTI_SWELL_MEASURES = {
  volume: { code: 'ase', name: 'Anti-swell efficiency (ASE)' },
  mass: { code: 'wre', name: 'Water-repellent effectiveness (WRE)' },
} as const satisfies Record<SwellingBasis, { code: string; name: string }>;

export interface AntiSwell {
  /** (S_control − S_treated)/S_control × 100: the ASE on the volume basis, the WRE on the mass basis (see measure). */
  asePct: number;
  basis: SwellingBasis;
  /** Which of the two the number is, and its name to show beside it. */
  measure: (typeof ANTI_SWELL_MEASURES)[SwellingBasis]['code'];
  name: string;
  controlSwellingPct: number;
  controlCount: number;
}

/**
 * ASE (volume basis) or WRE (mass basis) of a treated coupon against the mean swelling or water uptake of
 * its controls (same species, same trial), on the same basis; the mass basis is what a shop's quick
 * soak-and-reweigh shows. Null when there is no comparable control or it did not swell.
 */
export function antiSwell(
  treated: Pick<CouponMetrics, 'swellingPct' | 'swellingBasis'>,
  controls: readonly Pick<CouponMetrics, 'swellingPct' | 'swellingBasis'>[],
): AntiSwell | null {
  if (treated.swellingPct === null || treated.swellingBasis === null) return null;
  const same = controls.filter((c) => c.swellingBasis === treated.swellingBasis && c.swellingPct !== null).map((c) => c.swellingPct as number);
  if (same.length === 0) return null;
  const mean = same.reduce((a, b) => a + b, 0) / same.length;
  const measure = ANTI_SWELL_MEASURES[treated.swellingBasis];
  try {
    return {
      asePct: antiSwellEfficiency(mean, treated.swellingPct),
      basis: treated.swellingBasis,
      measure: measure.code,
      name: measure.name,
      controlSwellingPct: mean,
      controlCount: same.length,
    };
  } catch (e) {
    if (e instanceof DomainError) return null;
    throw e;
  }
}

/**
 * ASE for every treated coupon in a list, against the controls of the same trial and species in the
 * same list. Answers one entry per input, in order (null for controls and for coupons without one).
 */
export function antiSwellForList(
  coupons: readonly { trialId: number | null; speciesId: number; role: CouponRole; metrics: Pick<CouponMetrics, 'swellingPct' | 'swellingBasis'> }[],
): (AntiSwell | null)[] {
  const controls = new Map<string, Pick<CouponMetrics, 'swellingPct' | 'swellingBasis'>[]>();
  for (const c of coupons) {
    if (c.role !== 'control' || c.trialId === null) continue;
    const key = `${c.trialId}|${c.speciesId}`;
    const list = controls.get(key) ?? [];
    list.push(c.metrics);
    controls.set(key, list);
  }
  return coupons.map((c) => (c.role === 'treated' && c.trialId !== null ? antiSwell(c.metrics, controls.get(`${c.trialId}|${c.speciesId}`) ?? []) : null));
}
