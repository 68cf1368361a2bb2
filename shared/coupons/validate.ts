import type { CheckKind, HardnessScale, WeighingStage } from '../constants/records';

/** A value the physics rules out: refused, with the field and the reason. */
export interface MeasurementProblem {
  field: string;
  message: string;
}

/**
 * Bounds for a moisture reading, % oven-dry basis. Green sapwood of some light species passes 200 %
 * (Wood Handbook ch. 4 green moisture table, from memory), so 300 % leaves room and still catches typos.
 */
export const MOISTURE_PCT_RANGE = { min: 0, max: 300 } as const;
/** Shore D is a 0–100 durometer scale (ASTM D2240). */
export const SHORE_D_RANGE = { min: 0, max: 100 } as const;

const fmt = (g: number) => `${Math.round(g * 1000) / 1000} g`;

/**
 * Is a new mass at `stage` possible, given the coupon's current masses? Resin and water only add mass
 * to a dry piece, so soaked and cured cannot be below dry; a dry mass above a soaked or cured one is the
 * same contradiction from the other side.
 */
export function weighingProblem(
  stage: WeighingStage,
  massG: number,
  current: { dry?: number | null; soaked?: number | null; cured?: number | null },
): MeasurementProblem | null {
  if (!Number.isFinite(massG) || massG <= 0) return { field: 'massG', message: 'A mass must be greater than 0 g' };
  const dry = current.dry ?? null;
  if ((stage === 'soaked' || stage === 'cured') && dry !== null && massG < dry) {
    return { field: 'massG', message: `The ${stage} mass ${fmt(massG)} cannot be below the dry mass ${fmt(dry)}: resin only adds mass` };
  }
  if (stage === 'dry') {
    for (const later of ['soaked', 'cured'] as const) {
      const m = current[later] ?? null;
      if (m !== null && massG > m) {
        return { field: 'massG', message: `The dry mass ${fmt(massG)} cannot be above the ${later} mass ${fmt(m)}: resin only adds mass` };
      }
    }
  }
  return null;
}

export interface CheckValues {
  kind: CheckKind;
  lengthMm?: number | null;
  widthMm?: number | null;
  thicknessMm?: number | null;
  volumeCm3?: number | null;
  hardnessValue?: number | null;
  hardnessScale?: HardnessScale | null;
  moisturePct?: number | null;
}

/** Every impossible value in a check, each naming its field. */
export function checkProblems(c: CheckValues): MeasurementProblem[] {
  const out: MeasurementProblem[] = [];
  const positive = (field: keyof CheckValues, v: number | null | undefined, what: string) => {
    if (v != null && !(v > 0)) out.push({ field, message: `${what} must be greater than 0` });
  };
  if (c.kind === 'dimension') {
    positive('lengthMm', c.lengthMm, 'The length');
    positive('widthMm', c.widthMm, 'The width');
    positive('thicknessMm', c.thicknessMm, 'The thickness');
    positive('volumeCm3', c.volumeCm3, 'The volume');
  } else if (c.kind === 'hardness') {
    const v = c.hardnessValue;
    if (v != null) {
      if (c.hardnessScale === 'shore-d') {
        if (v < SHORE_D_RANGE.min || v > SHORE_D_RANGE.max) out.push({ field: 'hardnessValue', message: 'Shore D runs from 0 to 100' });
      } else if (!(v > 0)) {
        out.push({ field: 'hardnessValue', message: 'A hardness reading must be greater than 0' });
      }
    }
  } else if (c.moisturePct != null && (c.moisturePct < MOISTURE_PCT_RANGE.min || c.moisturePct > MOISTURE_PCT_RANGE.max)) {
    out.push({ field: 'moisturePct', message: `Moisture content must lie between ${MOISTURE_PCT_RANGE.min} and ${MOISTURE_PCT_RANGE.max} %` });
  }
  return out;
}
