/**
 * Unit conversions for display and import. Stored values are always the canonical unit of each
 * quantity (g, mm, °C, kPa, cm³); conversion happens only at the edges.
 *
 * Defining constants: 1 in = 25.4 mm and 1 lb = 0.45359237 kg exactly (international yard and pound
 * agreement, 1959); 1 oz (avoirdupois) = 1/16 lb; 1 lbf = 1 lb × 9.80665 m/s² (CGPM 1901 standard
 * gravity); 1 torr = 101 325/760 Pa (CGPM 1954 standard atmosphere); conventional 1 mmHg =
 * 133.322387415 Pa and 1 inHg = 3386.389 Pa as listed in NIST SP 811 (2008) App. B. The agreement and
 * CGPM years and the SP 811 inHg factor are from memory; the numbers themselves are the standard ones.
 */

export const UNIT_SYSTEMS = ['metric', 'us'] as const;
export type UnitSystem = (typeof UNIT_SYSTEMS)[number];

export const QUANTITIES = ['mass', 'length', 'temperature', 'pressure', 'volume'] as const;
export type Quantity = (typeof QUANTITIES)[number];

export const MASS_UNITS = ['g', 'kg', 'oz', 'lb'] as const;
export const LENGTH_UNITS = ['mm', 'cm', 'in'] as const;
export const TEMPERATURE_UNITS = ['degC', 'degF'] as const;
export const PRESSURE_UNITS = ['kPa', 'Pa', 'inHg', 'mmHg', 'torr', 'mbar', 'psi'] as const;
export const VOLUME_UNITS = ['cm3', 'in3'] as const;

export type MassUnit = (typeof MASS_UNITS)[number];
export type LengthUnit = (typeof LENGTH_UNITS)[number];
export type TemperatureUnit = (typeof TEMPERATURE_UNITS)[number];
export type PressureUnit = (typeof PRESSURE_UNITS)[number];
export type VolumeUnit = (typeof VOLUME_UNITS)[number];
export type Unit = MassUnit | LengthUnit | TemperatureUnit | PressureUnit | VolumeUnit;

export interface UnitOf {
  mass: MassUnit;
  length: LengthUnit;
  temperature: TemperatureUnit;
  pressure: PressureUnit;
  volume: VolumeUnit;
}

export const GRAMS_PER_POUND = 453.59237;
export const GRAMS_PER_OUNCE = GRAMS_PER_POUND / 16;
export const MM_PER_INCH = 25.4;
export const PA_PER_TORR = 101325 / 760;
export const PA_PER_MMHG = 133.322387415;
/**
 * NIST SP 811's factor. The conventional definition 25.4 × PA_PER_MMHG gives 3386.38864…; the two
 * differ by 1 part in 10⁷, far below any vacuum gauge's resolution.
 */
export const PA_PER_INHG = 3386.389;
/** lbf/in² from the definitions: 0.45359237 kg × 9.80665 m/s² / (0.0254 m)² = 6894.757293168… Pa. */
export const PA_PER_PSI = (0.45359237 * 9.80665) / (0.0254 * 0.0254);
export const CM3_PER_IN3 = 2.54 * 2.54 * 2.54; // 16.387064 exactly by definition

/** Size of each unit in the canonical unit of its quantity (temperature is affine, handled apart). */
const GRAMS: Record<MassUnit, number> = { g: 1, kg: 1000, oz: GRAMS_PER_OUNCE, lb: GRAMS_PER_POUND };
const MILLIMETRES: Record<LengthUnit, number> = { mm: 1, cm: 10, in: MM_PER_INCH };
const PASCALS: Record<PressureUnit, number> = {
  kPa: 1000,
  Pa: 1,
  inHg: PA_PER_INHG,
  mmHg: PA_PER_MMHG,
  torr: PA_PER_TORR,
  mbar: 100,
  psi: PA_PER_PSI,
};
const CUBIC_CM: Record<VolumeUnit, number> = { cm3: 1, in3: CM3_PER_IN3 };

// Returning the input untouched for same-unit conversions keeps stored values bit-identical.
function scale<U extends string>(table: Record<U, number>, value: number, from: U, to: U): number {
  return from === to ? value : (value * table[from]) / table[to];
}

/** Mass, exact via grams: 1 lb = 453.59237 g, 1 oz = 1/16 lb (NIST SP 811 App. B). */
export function convertMass(value: number, from: MassUnit, to: MassUnit): number {
  return scale(GRAMS, value, from, to);
}

/** Length, exact via millimetres: 1 in = 25.4 mm (NIST SP 811 App. B). */
export function convertLength(value: number, from: LengthUnit, to: LengthUnit): number {
  return scale(MILLIMETRES, value, from, to);
}

/**
 * Pressure via pascals (factors above; NIST SP 811 App. B, CGPM 1954). Pressures and pressure
 * differences (gauge readings) convert alike: there is no offset.
 */
export function convertPressure(value: number, from: PressureUnit, to: PressureUnit): number {
  return scale(PASCALS, value, from, to);
}

/** Volume via cm³: 1 in³ = 2.54³ cm³ = 16.387064 cm³ exactly. */
export function convertVolume(value: number, from: VolumeUnit, to: VolumeUnit): number {
  return scale(CUBIC_CM, value, from, to);
}

/** °F = °C × 9/5 + 32, exact (NIST SP 811 App. B); for temperatures, not temperature differences. */
export function convertTemperature(value: number, from: TemperatureUnit, to: TemperatureUnit): number {
  if (from === to) return value;
  return from === 'degC' ? (value * 9) / 5 + 32 : ((value - 32) * 5) / 9;
}

/** Any quantity, dispatching to the converters above; the unit types keep mass from meeting length. */
export function convert<Q extends Quantity>(quantity: Q, value: number, from: UnitOf[Q], to: UnitOf[Q]): number {
  switch (quantity) {
    case 'mass':
      return convertMass(value, from as MassUnit, to as MassUnit);
    case 'length':
      return convertLength(value, from as LengthUnit, to as LengthUnit);
    case 'temperature':
      return convertTemperature(value, from as TemperatureUnit, to as TemperatureUnit);
    case 'pressure':
      return convertPressure(value, from as PressureUnit, to as PressureUnit);
    case 'volume':
      return convertVolume(value, from as VolumeUnit, to as VolumeUnit);
    default:
      throw new Error(`unknown quantity ${String(quantity)}`);
  }
}

/** The unit every value of a quantity is stored in. */
export const CANONICAL_UNITS: { readonly [Q in Quantity]: UnitOf[Q] } = {
  mass: 'g',
  length: 'mm',
  temperature: 'degC',
  pressure: 'kPa',
  volume: 'cm3',
};

/** The unit each unit system shows a quantity in. US shops read vacuum gauges in inHg. */
export const DISPLAY_UNITS: { readonly [S in UnitSystem]: { readonly [Q in Quantity]: UnitOf[Q] } } = {
  metric: { mass: 'g', length: 'mm', temperature: 'degC', pressure: 'kPa', volume: 'cm3' },
  us: { mass: 'oz', length: 'in', temperature: 'degF', pressure: 'inHg', volume: 'in3' },
};

export const UNIT_LABELS: Record<Unit, string> = {
  g: 'g',
  kg: 'kg',
  oz: 'oz',
  lb: 'lb',
  mm: 'mm',
  cm: 'cm',
  in: 'in',
  degC: '°C',
  degF: '°F',
  kPa: 'kPa',
  Pa: 'Pa',
  inHg: 'inHg',
  mmHg: 'mmHg',
  torr: 'Torr',
  mbar: 'mbar',
  psi: 'psi',
  cm3: 'cm³',
  in3: 'in³',
};

/**
 * Decimals to show, chosen so one displayed step is about as fine as a typical shop instrument
 * (0.1 g scale, 0.1 mm caliper, 0.1 cm³ volume) in every unit, so switching systems never hides a
 * difference the metric display would show. Pressures get 0.01 kPa or its nearest equivalent.
 */
export const UNIT_DECIMALS: Record<Unit, number> = {
  g: 1,
  kg: 4,
  oz: 3,
  lb: 4,
  mm: 1,
  cm: 2,
  in: 3,
  degC: 1,
  degF: 1,
  kPa: 2,
  Pa: 0,
  inHg: 2,
  mmHg: 1,
  torr: 1,
  mbar: 1,
  psi: 2,
  cm3: 1,
  in3: 3,
};

export interface DisplayUnit<Q extends Quantity = Quantity> {
  unit: UnitOf[Q];
  label: string;
  decimals: number;
}

/** Unit, label and decimals a unit system shows a quantity with. */
export function displayUnit<Q extends Quantity>(quantity: Q, system: UnitSystem): DisplayUnit<Q> {
  const unit = DISPLAY_UNITS[system][quantity] as UnitOf[Q];
  return { unit, label: UNIT_LABELS[unit], decimals: UNIT_DECIMALS[unit] };
}

/** Canonical (stored) value → the number shown in the given unit system. */
export function toDisplay(value: number, quantity: Quantity, system: UnitSystem): number {
  return convert(quantity, value, CANONICAL_UNITS[quantity], DISPLAY_UNITS[system][quantity]);
}

/** Number typed in the given unit system → canonical (stored) value. */
export function fromDisplay(value: number, quantity: Quantity, system: UnitSystem): number {
  return convert(quantity, value, DISPLAY_UNITS[system][quantity], CANONICAL_UNITS[quantity]);
}
