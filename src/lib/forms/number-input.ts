import type { Quantity } from '../../../shared/units';
import { parseNumber } from './parse-number';

/**
 * `form.register(name, numberInput)`: the box's text is read with `parseNumber` (decimal point or comma),
 * so the form holds a number in the box's own unit, `null` when empty, or NaN (which the resolver names).
 */
export const numberInput = { setValueAs: (v: unknown) => parseNumber(v as string | number | null | undefined) };
/** The same for a number the contract requires: an empty box is missing (undefined), so the contract names it. */
export const requiredNumberInput = { setValueAs: (v: unknown) => parseNumber(v as string | number | null | undefined) ?? undefined };

/** The conversions a form needs from `useUnits()`. */
export interface DisplayUnits {
  toDisplay: (value: number, q: Quantity) => number;
  fromDisplay: (value: number, q: Quantity) => number;
}

/** A box's number (display unit) → SI; empty stays null and a bad number stays NaN, so the resolver can name it. */
export function toSi(value: number | null | undefined, q: Quantity, units: DisplayUnits): number | null {
  if (value === null || value === undefined) return null;
  return Number.isNaN(value) ? Number.NaN : units.fromDisplay(value, q);
}

/** SI → the number a box shows in the user's unit, without binary noise (25.400000000000002 → 25.4). */
export function toBox(value: number | null | undefined, q: Quantity, units: DisplayUnits): number | null {
  if (value === null || value === undefined) return null;
  return Number(units.toDisplay(value, q).toPrecision(10));
}
