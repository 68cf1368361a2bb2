import { convertTemperature, unitPrefs, UNIT_LABELS, type UnitChoice } from '../units';

/** n rounded to `decimals` places, without trailing zeros: 250, 93.3, 121.15. */
function trimmed(n: number, decimals: number): string {
  const f = 10 ** decimals;
  const r = Math.round(n * f) / f;
  return String(Object.is(r, -0) ? 0 : r);
}

/**
 * A temperature stored in °C, shown in the user's units: whole degrees when it is one, else up to
 * `decimals` places (1 for windows and set points, 2 for readings so nothing near an edge hides).
 */
export function formatTemperature(tempC: number, units: UnitChoice = 'metric', decimals = 1): string {
  const unit = unitPrefs(units).temperature;
  return `${trimmed(convertTemperature(tempC, 'degC', unit), decimals)} ${UNIT_LABELS[unit]}`;
}

/** A window such as "200–250 °F" or "93.3–121.1 °C". */
export function formatTemperatureRange(minC: number, maxC: number, units: UnitChoice = 'metric'): string {
  const lo = formatTemperature(minC, units).replace(/ °[CF]$/, '');
  return `${lo}–${formatTemperature(maxC, units)}`;
}

/** Whole seconds in a duration given in minutes; durations are compared at this resolution. */
export function durationSeconds(minutes: number): number {
  return Math.round(minutes * 60);
}

/**
 * A duration in hours, minutes and, when it has them, seconds: "8 h", "7 h 59 min 42 s", "45 min".
 * Never rounds to the minute, so two durations a rule told apart never read the same.
 */
export function formatDuration(minutes: number): string {
  const total = durationSeconds(minutes);
  const h = Math.floor(total / 3600);
  const m = Math.floor((total % 3600) / 60);
  const s = total % 60;
  const parts = [h > 0 ? `${h} h` : '', m > 0 ? `${m} min` : '', s > 0 ? `${s} s` : ''].filter(Boolean);
  return parts.length === 0 ? '0 min' : parts.join(' ');
}
