import { DomainError, requireFinite, requirePositiveMass } from './errors';

export interface MassReading {
  /** ISO 8601 string or Date of the weighing. */
  at: string | Date;
  massG: number;
}

export interface ConstantMassCriteria {
  /** Shortest time, h, between the two weighings compared (e.g. 2 h). */
  minIntervalHours: number;
  /** Largest mass change, % of the earlier weighing, still counted as constant (e.g. 0.1 %). */
  maxChangePct: number;
}

export interface ConstantMassResult {
  reached: boolean;
  /** Signed change from the compared earlier weighing to the latest, % (negative while drying). */
  lastChangePct: number | null;
  /** Hours between the two weighings compared. */
  intervalHours: number | null;
  /**
   * Largest change, % of the earlier weighing, of any weighing from the earlier one to the latest
   * (signed, the one with the largest size); this is what the criterion is judged on.
   */
  largestChangePct: number | null;
  /** The weighings compared: the earlier reference and the latest, with their times as ISO text. */
  compared: { from: { at: string; massG: number }; to: { at: string; massG: number }; readings: number } | null;
}

const MS_PER_HOUR = 3_600_000;

function toTime(at: string | Date, index: number): number {
  const t = at instanceof Date ? at.getTime() : typeof at === 'string' ? Date.parse(at) : Number.NaN;
  if (!Number.isFinite(t)) {
    throw new DomainError('invalid-date', 'readings', `readings[${index}].at is not a valid date`, index);
  }
  return t;
}

/** Changes this close to the limit, relative to it, count as at the limit, so roundoff cannot decide. */
const LIMIT_ROUNDOFF = 1e-9;

/**
 * Drying to constant mass: takes the latest weighing and the latest earlier one taken at least
 * minIntervalHours before it, and every weighing in between; reached when each of them differs from
 * the earlier one by less than maxChangePct of it (|m_i − m_earlier|/m_earlier × 100 < maxChangePct).
 * "Less than" is strict, and a change within 10⁻⁹ of the limit counts as at the limit (so 100 g →
 * 99.9 g against 0.1 % is not reached, whichever way the division rounds). A weighing in between that
 * moved more (the mass dipped and came back, or was still falling) keeps it from counting as constant.
 * ASTM D4442 asks for oven-drying "to constant mass" without fixing the numbers here; EN 13183-1 uses
 * 103 ± 2 °C with a change of 0.1 % over 2 h (as quoted in a secondary source), so the shop supplies
 * both criteria. Readings may come in any order. Fewer than two usable weighings gives reached = false
 * with nulls.
 */
export function reachedConstantMass(readings: readonly MassReading[], { minIntervalHours, maxChangePct }: ConstantMassCriteria): ConstantMassResult {
  requireFinite(minIntervalHours, 'minIntervalHours');
  requireFinite(maxChangePct, 'maxChangePct');
  if (minIntervalHours < 0) {
    throw new DomainError('negative-value', 'minIntervalHours', 'minIntervalHours cannot be negative');
  }
  if (maxChangePct < 0) throw new DomainError('negative-value', 'maxChangePct', 'maxChangePct cannot be negative');

  const none: ConstantMassResult = { reached: false, lastChangePct: null, intervalHours: null, largestChangePct: null, compared: null };
  const points = readings.map((r, i) => ({ t: toTime(r.at, i), massG: requirePositiveMass(r.massG, 'readings', i) }));
  // A stable sort keeps the later-entered of two same-time weighings last, which is the one the shop
  // most recently typed in.
  points.sort((p, q) => p.t - q.t);

  const latest = points.at(-1);
  if (latest === undefined) return none;
  const cutoff = latest.t - minIntervalHours * MS_PER_HOUR;
  let from = -1;
  for (let i = points.length - 2; i >= 0; i--) {
    const p = points[i];
    if (p !== undefined && p.t <= cutoff) {
      from = i;
      break;
    }
  }
  const earlier = points[from];
  if (earlier === undefined) return none;

  const change = (m: number) => ((m - earlier.massG) / earlier.massG) * 100;
  let largestChangePct = 0;
  for (let i = from + 1; i < points.length; i++) {
    const c = change((points[i] as { massG: number }).massG);
    if (Math.abs(c) > Math.abs(largestChangePct)) largestChangePct = c;
  }
  const lastChangePct = change(latest.massG);
  return {
    reached: Math.abs(largestChangePct) < maxChangePct * (1 - LIMIT_ROUNDOFF),
    lastChangePct,
    intervalHours: (latest.t - earlier.t) / MS_PER_HOUR,
    largestChangePct,
    compared: {
      from: { at: new Date(earlier.t).toISOString(), massG: earlier.massG },
      to: { at: new Date(latest.t).toISOString(), massG: latest.massG },
      readings: points.length - from,
    },
  };
}
