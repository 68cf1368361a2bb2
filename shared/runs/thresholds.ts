/**
 * Rules of thumb the run checks apply. Common practice, no published source: none of these comes
 * from a handbook or a standard, and a shop may know better for its own resin.
 */

import { CURE_TEMPERATURE_RANGE_C, SOAK_TO_VACUUM_TIME_RATIO } from '../domain/rules-of-thumb';

/** Soak at least this many times as long as the vacuum was held. */
export const SOAK_TO_VACUUM_RATIO = SOAK_TO_VACUUM_TIME_RATIO;

/** Cure window used when a resin has none of its own, °C (about 200–250 °F). */
export const DEFAULT_CURE_WINDOW_C = { min: CURE_TEMPERATURE_RANGE_C[0], max: CURE_TEMPERATURE_RANGE_C[1] } as const;

/** Shortest cure for thin pieces, minutes; thicker ones need longer. */
export const MIN_CURE_MINUTES = 120;

/** Coupons up to this thickness, mm, count as thin for the cure-time rule (about 1 in). */
export const THIN_COUPON_MAX_MM = 25.4;

/** Lot shelf life used when a resin gives none, days (activated resin keeps about a year stored cool). */
export const DEFAULT_SHELF_LIFE_DAYS = 365;

/** A lot this close to its shelf life, days, is flagged before it expires. */
export const LOT_NEAR_EXPIRY_DAYS = 30;
