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
}

const MS_PER_HOUR = 3_600_000;

function toTime(at: string | Date, index: number): number {
  const t = at instanceof Date ? at.getTime() : typeof at === 'string' ? Date.parse(at) : Number.NaN;
  if (!Number.isFinite(t)) {
    throw new DomainError('invalid-date', 'readings', `readings[${index}].at is not a valid date`, index);
  }
  return t;
}

/**
 * Drying to constant mass: compares the latest weighing with the latest earlier one taken at least
 * minIntervalHours before it; reached when |Δm|/m_earlier × 100 ≤ maxChangePct. ASTM D4442 asks for
 * oven-drying "to constant mass" without fixing the numbers here; EN 13183-1 uses 103 ± 2 °C with
 * ≤ 0.1 % change over 2 h (as quoted in a secondary source), so the shop supplies both criteria.
 * Readings may come in any order. Fewer than two usable weighings gives reached = false with nulls.
 */
export function reachedConstantMass(
  readings: readonly MassReading[],
  { minIntervalHours, maxChangePct }: ConstantMassCriteria,
): ConstantMassResult {
  requireFinite(minIntervalHours, 'minIntervalHours');
  requireFinite(maxChangePct, 'maxChangePct');
  if (minIntervalHours < 0) {
    throw new DomainError('negative-value', 'minIntervalHours', 'minIntervalHours cannot be negative');
  }
  if (maxChangePct < 0) throw new DomainError('negative-value', 'maxChangePct', 'maxChangePct cannot be negative');

  const points = readings.map((r, i) => ({ t: toTime(r.at, i), massG: requirePositiveMass(r.massG, 'readings', i) }));
  // A stable sort keeps the later-entered of two same-time weighings last, which is the one the shop
  // most recently typed in.
  points.sort((p, q) => p.t - q.t);

  const latest = points.at(-1);
  if (latest === undefined) return { reached: false, lastChangePct: null, intervalHours: null };
  const cutoff = latest.t - minIntervalHours * MS_PER_HOUR;
  let earlier: { t: number; massG: number } | undefined;
  for (let i = points.length - 2; i >= 0; i--) {
    const p = points[i];
    if (p !== undefined && p.t <= cutoff) {
      earlier = p;
      break;
    }
  }
  if (earlier === undefined) return { reached: false, lastChangePct: null, intervalHours: null };

  const lastChangePct = ((latest.massG - earlier.massG) / earlier.massG) * 100;
  return {
    reached: Math.abs(lastChangePct) <= maxChangePct,
    lastChangePct,
    intervalHours: (latest.t - earlier.t) / MS_PER_HOUR,
  };
}
