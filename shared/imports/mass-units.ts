import { GRAMS_PER_OUNCE, GRAMS_PER_POUND } from '../units';

/**
 * Units a scale may write a mass in. Carat and pennyweight appear on jewellery and lab balances,
 * which shops borrow for small coupons.
 */
export const IMPORT_MASS_UNITS = ['g', 'kg', 'oz', 'lb', 'ct', 'dwt'] as const;
export type ImportMassUnit = (typeof IMPORT_MASS_UNITS)[number];

/** 1 grain = 64.798 91 mg exactly (NIST Handbook 44 App. C; NIST SP 811 App. B). */
export const GRAMS_PER_GRAIN = 0.06479891;

/**
 * Grams in one of each unit, exact by definition:
 * g; kg = 1000 g; oz (avoirdupois) = 28.349 523 125 g and lb = 453.592 37 g (NIST SP 811 App. B);
 * metric carat = 200 mg (NIST Handbook 44 App. C, and SP 811 App. B "carat, metric");
 * pennyweight = 24 grains = 1.555 173 84 g (NIST Handbook 44 App. C, troy units).
 */
export const GRAMS_PER_UNIT: Record<ImportMassUnit, number> = {
  g: 1,
  kg: 1000,
  oz: GRAMS_PER_OUNCE,
  lb: GRAMS_PER_POUND,
  ct: 0.2,
  dwt: 24 * GRAMS_PER_GRAIN,
};

/**
 * The spellings scales print for each unit, lower-cased. "gn"/"gr" (grain) is deliberately absent:
 * a lone "gr" is read by some as gram, and guessing would silently scale a mass by 15.
 */
const ALIASES: Record<string, ImportMassUnit> = {
  g: 'g',
  gm: 'g',
  gram: 'g',
  grams: 'g',
  kg: 'kg',
  kgs: 'kg',
  oz: 'oz',
  ozs: 'oz',
  ounce: 'oz',
  ounces: 'oz',
  lb: 'lb',
  lbs: 'lb',
  pound: 'lb',
  pounds: 'lb',
  ct: 'ct',
  car: 'ct',
  carat: 'ct',
  carats: 'ct',
  dwt: 'dwt',
  pwt: 'dwt',
};

/** A unit as printed (any case, surrounding spaces, a trailing dot) → its code, or null if unknown. */
export function readMassUnit(text: string): ImportMassUnit | null {
  // Most files print the unit as its code ("g"): looked up as it is, before trimming and lower-casing.
  if (Object.hasOwn(ALIASES, text)) return ALIASES[text] as ImportMassUnit;
  const key = text.trim().replace(/\.$/, '').toLowerCase();
  // Own keys only: "constructor" or "toString" is no unit.
  return Object.hasOwn(ALIASES, key) ? (ALIASES[key] as ImportMassUnit) : null;
}

/** A mass in `unit` → grams. */
export function toGrams(value: number, unit: ImportMassUnit): number {
  return unit === 'g' ? value : value * GRAMS_PER_UNIT[unit];
}
