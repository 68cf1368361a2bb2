import { DomainError, basicSpecificGravity, specificGravityAtMoisture } from '../domain/index';

/**
 * Coefficient of variation of specific gravity within a species, used where the species row gives
 * none. The USDA Wood Handbook (FPL-GTR-190) ch. 5 lists about 10 % as the typical coefficient of
 * variation of specific gravity among clear specimens of one species. That figure is recalled from
 * memory of the chapter's variability table and should be checked against it.
 */
export const DEFAULT_SG_COV = 0.1;

/** Beyond this many standard deviations from the species reference a measured SG is flagged. */
export const SG_WARNING_SDS = 3;

export interface SpeciesDensity {
  basicSg: number | null;
  sg12: number | null;
  measuredDensityKgM3: number | null;
  measuredMoisturePct: number | null;
  sgCoefficientOfVariation: number | null;
}

/**
 * The species' expected oven-dry SG (oven-dry mass / oven-dry volume), comparable with a dry coupon's
 * mass over its measured volume: from the basic SG (Wood Handbook ch. 4 adjustment to 0 % MC); else
 * from SG at 12 % MC through basic SG; else from a shop-measured density at its moisture content
 * (G_M = ρ / (1000·(1 + M/100))). Null when the species row has none of these or they are out of range.
 */
export function referenceOvenDrySg(s: SpeciesDensity): number | null {
  const r = referenceOf(s);
  return 'sg' in r ? r.sg : null;
}

/** The reference, or why a species row that has density data cannot give one (null: it has none). */
function referenceOf(s: SpeciesDensity): { sg: number } | { problem: string | null } {
  try {
    if (s.basicSg != null) return { sg: specificGravityAtMoisture(s.basicSg, 0) };
    if (s.sg12 != null) return { sg: specificGravityAtMoisture(basicSpecificGravity(s.sg12, 12), 0) };
    if (s.measuredDensityKgM3 != null) {
      const m = s.measuredMoisturePct ?? 0;
      const gM = s.measuredDensityKgM3 / (1000 * (1 + m / 100));
      return { sg: specificGravityAtMoisture(basicSpecificGravity(gM, m), 0) };
    }
  } catch (e) {
    if (e instanceof DomainError) return { problem: e.message };
    throw e;
  }
  return { problem: null };
}

export interface SgPlausibility {
  /** Null when the species row's density data describe no possible wood (see problem). */
  referenceSg: number | null;
  coefficientOfVariation: number;
  /** Signed distance from the reference in standard deviations; null without a reference. */
  z: number | null;
  plausible: boolean;
  /** Why the measured SG could not be checked although the species has density data. */
  problem?: string;
}

/**
 * A measured dry SG against the species reference: plausible within SG_WARNING_SDS standard deviations.
 * Null when the species row has no density data. A row whose data describe no possible wood (denser than
 * cell-wall substance, or wetter than its maximum moisture) is not skipped in silence: it answers
 * plausible = false with the problem, so the warning says the check could not be made.
 */
export function sgPlausibility(measuredSg: number, species: SpeciesDensity): SgPlausibility | null {
  if (!Number.isFinite(measuredSg)) return null;
  const cov = species.sgCoefficientOfVariation ?? DEFAULT_SG_COV;
  const ref = referenceOf(species);
  if (!('sg' in ref)) {
    return ref.problem === null ? null : { referenceSg: null, coefficientOfVariation: cov, z: null, plausible: false, problem: ref.problem };
  }
  const z = (measuredSg - ref.sg) / (cov * ref.sg);
  return { referenceSg: ref.sg, coefficientOfVariation: cov, z, plausible: Math.abs(z) <= SG_WARNING_SDS };
}

export function sgWarningText(measuredSg: number, p: SgPlausibility): string {
  if (p.referenceSg === null || p.z === null) {
    return (
      `The measured dry SG ${measuredSg.toFixed(3)} could not be checked: the species' reference density describes no ` +
      `possible wood (${p.problem ?? 'out of range'}); correct the species row.`
    );
  }
  const cov = Math.round(p.coefficientOfVariation * 1000) / 10;
  return (
    `The measured dry SG ${measuredSg.toFixed(3)} is ${Math.abs(p.z).toFixed(1)} standard deviations ` +
    `${p.z > 0 ? 'above' : 'below'} the species' oven-dry reference ${p.referenceSg.toFixed(3)} ` +
    `(coefficient of variation ${cov} %); check the mass, the dimensions and the species.`
  );
}
