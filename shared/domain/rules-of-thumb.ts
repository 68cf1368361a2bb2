/**
 * Rules of thumb of the stabilizing trade, for check values and warnings.
 * Common practice, no published source: none of these comes from a handbook or standard.
 */

/** Soak at least this many times as long as the vacuum was held (so a 4–6 h vacuum means an overnight soak). */
export const SOAK_TO_VACUUM_TIME_RATIO = 2;

/** Oven temperatures for curing heat-cure resin with the wood in the oven, °F, as the trade states them. */
export const CURE_TEMPERATURE_RANGE_F = [200, 250] as const;

/**
 * The same window in °C, converted exactly (°C = (°F − 32) × 5/9, the expression the unit conversion
 * uses, so an oven typed as 250 °F is stored as exactly this upper end): 93.33… to 121.11… °C. The
 * rounded 93–121 °C would fail an oven at 250 °F and pass one at 199.5 °F.
 */
export const CURE_TEMPERATURE_RANGE_C: readonly [number, number] = [((CURE_TEMPERATURE_RANGE_F[0] - 32) * 5) / 9, ((CURE_TEMPERATURE_RANGE_F[1] - 32) * 5) / 9];

/**
 * Slack at both ends of a cure window, °C: half the 0.1 °C step temperatures are shown in, so a metric
 * reading of 93.3 °C or 121.1 °C (the window as a metric user sees it) counts as inside, while a reading
 * 0.1 °F outside 200–250 °F (0.056 °C) still counts as outside. Our choice; see docs/decisions.
 */
export const CURE_WINDOW_SLACK_C = 0.05;

/** Whether an oven temperature, °C, lies in the cure window [minC, maxC] (with CURE_WINDOW_SLACK_C). */
export function inCureWindow(tempC: number, minC: number, maxC: number): boolean {
  return tempC >= minC - CURE_WINDOW_SLACK_C && tempC <= maxC + CURE_WINDOW_SLACK_C;
}

/** A vacuum gauge reads about this much less, inHg, for every 1,000 ft of altitude. */
export const GAUGE_DROP_INHG_PER_1000_FT = 1;

/** Shortest soak, h, for a vacuum held vacuumHours. */
export function minimumSoakHours(vacuumHours: number): number {
  return SOAK_TO_VACUUM_TIME_RATIO * vacuumHours;
}
