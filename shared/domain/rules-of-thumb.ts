/**
 * Rules of thumb of the stabilizing trade, for check values and warnings.
 * Common practice, no published source: none of these comes from a handbook or standard.
 */

/** Soak at least this many times as long as the vacuum was held (so a 4–6 h vacuum means an overnight soak). */
export const SOAK_TO_VACUUM_TIME_RATIO = 2;

/** Oven set-points for curing heat-cure resin with the wood in the oven, °F and the same span in °C. */
export const CURE_TEMPERATURE_RANGE_F = [200, 250] as const;
export const CURE_TEMPERATURE_RANGE_C = [93, 121] as const;

/** A vacuum gauge reads about this much less, inHg, for every 1,000 ft of altitude. */
export const GAUGE_DROP_INHG_PER_1000_FT = 1;

/** Shortest soak, h, for a vacuum held vacuumHours. */
export function minimumSoakHours(vacuumHours: number): number {
  return SOAK_TO_VACUUM_TIME_RATIO * vacuumHours;
}
