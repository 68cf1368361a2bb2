/**
 * Unit conversions for display and import. Stored values are always the canonical unit of each
 * quantity (g, mm, °C, kPa, cm³ for a piece, mL for a liquid, kg/m³, m of altitude, N of force);
 * conversion happens only at the edges.
 *
 * Defining constants: 1 in = 25.4 mm, 1 ft = 0.3048 m and 1 lb = 0.45359237 kg exactly
 * (international yard and pound agreement, 1959); 1 oz (avoirdupois) = 1/16 lb; 1 US gallon = 231 in³
 * exactly, 1 US quart = 1/4 gal, 1 US fluid ounce = 1/128 gal; 1 lbf = 1 lb × 9.80665 m/s² (CGPM 1901
 * standard gravity); 1 torr = 101 325/760 Pa (CGPM 1954 standard atmosphere); conventional 1 mmHg =
 * 133.322387415 Pa and 1 inHg = 3386.389 Pa as listed in NIST SP 811 (2008) App. B. The agreement and
 * CGPM years and the SP 811 inHg factor are from memory; the numbers themselves are the standard ones.
 *
 * A user chooses a unit per quantity (`UnitPrefs`), starting from the metric or the US preset: a US
 * shop with a gram scale shows mass in g and everything else in US units. Every function that takes a
 * `UnitChoice` accepts either a preset name or a full per-quantity choice.
 */

// The tuples live in shared/constants/units.ts (the user contract needs them, and importing them from there
// keeps these conversions out of the sign-in page's first load, decision 0014); this module uses them and
// passes them on to its callers.
import {
  ALTITUDE_UNITS,
  DENSITY_UNITS,
  FORCE_UNITS,
  LENGTH_UNITS,
  LIQUID_VOLUME_UNITS,
  MASS_UNITS,
  PRESSURE_UNITS,
  QUANTITIES,
  TEMPERATURE_UNITS,
  UNIT_SYSTEMS,
  VOLUME_UNITS,
  type Quantity,
  type UnitSystem,
} from './constants/units';

export * from './constants/units';

export type MassUnit = (typeof MASS_UNITS)[number];
export type LengthUnit = (typeof LENGTH_UNITS)[number];
export type TemperatureUnit = (typeof TEMPERATURE_UNITS)[number];
export type PressureUnit = (typeof PRESSURE_UNITS)[number];
export type VolumeUnit = (typeof VOLUME_UNITS)[number];
export type LiquidVolumeUnit = (typeof LIQUID_VOLUME_UNITS)[number];
export type DensityUnit = (typeof DENSITY_UNITS)[number];
export type AltitudeUnit = (typeof ALTITUDE_UNITS)[number];
export type ForceUnit = (typeof FORCE_UNITS)[number];
export type Unit = MassUnit | LengthUnit | TemperatureUnit | PressureUnit | VolumeUnit | LiquidVolumeUnit | DensityUnit | AltitudeUnit | ForceUnit;

export interface UnitOf {
  mass: MassUnit;
  length: LengthUnit;
  temperature: TemperatureUnit;
  pressure: PressureUnit;
  volume: VolumeUnit;
  liquidVolume: LiquidVolumeUnit;
  density: DensityUnit;
  altitude: AltitudeUnit;
  force: ForceUnit;
}

/** The units a quantity may be shown in, in the order a preferences screen offers them. */
export const UNITS_OF: { readonly [Q in Quantity]: readonly UnitOf[Q][] } = {
  mass: MASS_UNITS,
  length: LENGTH_UNITS,
  temperature: TEMPERATURE_UNITS,
  pressure: PRESSURE_UNITS,
  volume: VOLUME_UNITS,
  liquidVolume: LIQUID_VOLUME_UNITS,
  density: DENSITY_UNITS,
  altitude: ALTITUDE_UNITS,
  force: FORCE_UNITS,
};

export const GRAMS_PER_POUND = 453.59237;
export const GRAMS_PER_OUNCE = GRAMS_PER_POUND / 16;
export const MM_PER_INCH = 25.4;
export const METRES_PER_FOOT = 0.3048;
export const PA_PER_TORR = 101325 / 760;
export const PA_PER_MMHG = 133.322387415;
/**
 * NIST SP 811's factor. The conventional definition 25.4 × PA_PER_MMHG gives 3386.38864…; the two
 * differ by 1 part in 10⁷, far below any vacuum gauge's resolution.
 */
export const PA_PER_INHG = 3386.389;
/** lbf/in² from the definitions: 0.45359237 kg × 9.80665 m/s² / (0.0254 m)² = 6894.757293168… Pa. */
export const PA_PER_PSI = (0.45359237 * 9.80665) / (0.0254 * 0.0254);
/** 1 lbf = 0.45359237 kg × 9.80665 m/s² = 4.4482216152605 N exactly. */
export const NEWTONS_PER_LBF = 0.45359237 * 9.80665;
export const CM3_PER_IN3 = 2.54 * 2.54 * 2.54; // 16.387064 exactly by definition
/** US liquid gallon = 231 in³ exactly = 3785.411784 mL. */
export const ML_PER_US_GALLON = 231 * CM3_PER_IN3;
/** lb/ft³ in kg/m³: 0.45359237 kg / (0.3048 m)³ = 16.018463373960… */
export const KG_M3_PER_LB_FT3 = 0.45359237 / (METRES_PER_FOOT * METRES_PER_FOOT * METRES_PER_FOOT);

/**
 * Size of each unit in the canonical unit of its quantity. Temperature is affine and converted apart;
 * its entries are the size of one degree, which is what precision arithmetic needs.
 */
const SIZE: Record<Unit, number> = {
  g: 1,
  kg: 1000,
  oz: GRAMS_PER_OUNCE,
  lb: GRAMS_PER_POUND,
  mm: 1,
  cm: 10,
  in: MM_PER_INCH,
  degC: 1,
  degF: 5 / 9,
  kPa: 1,
  Pa: 1 / 1000,
  inHg: PA_PER_INHG / 1000,
  mmHg: PA_PER_MMHG / 1000,
  torr: PA_PER_TORR / 1000,
  mbar: 0.1,
  psi: PA_PER_PSI / 1000,
  cm3: 1,
  in3: CM3_PER_IN3,
  mL: 1,
  L: 1000,
  floz: ML_PER_US_GALLON / 128,
  qt: ML_PER_US_GALLON / 4,
  gal: ML_PER_US_GALLON,
  kgPerM3: 1,
  gPerCm3: 1000,
  lbPerFt3: KG_M3_PER_LB_FT3,
  m: 1,
  ft: METRES_PER_FOOT,
  N: 1,
  kN: 1000,
  lbf: NEWTONS_PER_LBF,
};

// Dividing by the target's size in pascals (not kPa) keeps the historic pressure results bit-identical.
const PASCALS: Record<PressureUnit, number> = {
  kPa: 1000,
  Pa: 1,
  inHg: PA_PER_INHG,
  mmHg: PA_PER_MMHG,
  torr: PA_PER_TORR,
  mbar: 100,
  psi: PA_PER_PSI,
};

// Returning the input untouched for same-unit conversions keeps stored values bit-identical.
function scale<U extends string>(table: Record<U, number>, value: number, from: U, to: U): number {
  return from === to ? value : (value * table[from]) / table[to];
}

/** Mass, exact via grams: 1 lb = 453.59237 g, 1 oz = 1/16 lb (NIST SP 811 App. B). */
export function convertMass(value: number, from: MassUnit, to: MassUnit): number {
  return scale(SIZE, value, from, to);
}

/** Length, exact via millimetres: 1 in = 25.4 mm (NIST SP 811 App. B). */
export function convertLength(value: number, from: LengthUnit, to: LengthUnit): number {
  return scale(SIZE, value, from, to);
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
  return scale(SIZE, value, from, to);
}

/** Liquid volume via mL: 1 US gal = 231 in³ = 3785.411784 mL; qt = gal/4; fl oz = gal/128 (NIST SP 811 App. B). */
export function convertLiquidVolume(value: number, from: LiquidVolumeUnit, to: LiquidVolumeUnit): number {
  return scale(SIZE, value, from, to);
}

/** Density (mass per volume) via kg/m³: 1 g/cm³ = 1000 kg/m³; 1 lb/ft³ = 16.018463… kg/m³ (NIST SP 811 App. B). */
export function convertDensity(value: number, from: DensityUnit, to: DensityUnit): number {
  return scale(SIZE, value, from, to);
}

/** Altitude via metres: 1 ft = 0.3048 m exactly. */
export function convertAltitude(value: number, from: AltitudeUnit, to: AltitudeUnit): number {
  return scale(SIZE, value, from, to);
}

/** Force via newtons: 1 lbf = 4.4482216152605 N exactly (NIST SP 811 App. B). */
export function convertForce(value: number, from: ForceUnit, to: ForceUnit): number {
  return scale(SIZE, value, from, to);
}

/** °F = °C × 9/5 + 32, exact (NIST SP 811 App. B); for temperatures, not temperature differences. */
export function convertTemperature(value: number, from: TemperatureUnit, to: TemperatureUnit): number {
  if (from === to) return value;
  return from === 'degC' ? (value * 9) / 5 + 32 : ((value - 32) * 5) / 9;
}

/** Any quantity, dispatching to the converters above; the unit types keep mass from meeting length. */
export function convert<Q extends Quantity>(quantity: Q, value: number, from: UnitOf[Q], to: UnitOf[Q]): number {
  switch (quantity) {
    case 'temperature':
      return convertTemperature(value, from as TemperatureUnit, to as TemperatureUnit);
    case 'pressure':
      return convertPressure(value, from as PressureUnit, to as PressureUnit);
    case 'mass':
    case 'length':
    case 'volume':
    case 'liquidVolume':
    case 'density':
    case 'altitude':
    case 'force':
      return scale(SIZE, value, from as Unit, to as Unit);
    default:
      throw new Error(`unknown quantity ${String(quantity)}`);
  }
}

/** A unit choice for every quantity. */
export type UnitPrefs = { [Q in Quantity]: UnitOf[Q] };
/** What the display functions accept: a preset's name, or a full per-quantity choice. */
export type UnitChoice = UnitSystem | UnitPrefs;

/** The unit every value of a quantity is stored in. */
export const CANONICAL_UNITS: Readonly<UnitPrefs> = {
  mass: 'g',
  length: 'mm',
  temperature: 'degC',
  pressure: 'kPa',
  volume: 'cm3',
  liquidVolume: 'mL',
  density: 'kgPerM3',
  altitude: 'm',
  force: 'N',
};

/**
 * The two presets. US shops read vacuum gauges in inHg, give Janka hardness in lbf and treatment
 * retention in lb/ft³; metric shops follow the Wood Handbook's SI columns (kg/m³, N).
 */
export const UNIT_PRESETS: { readonly [S in UnitSystem]: Readonly<UnitPrefs> } = {
  metric: {
    mass: 'g',
    length: 'mm',
    temperature: 'degC',
    pressure: 'kPa',
    volume: 'cm3',
    liquidVolume: 'L',
    density: 'kgPerM3',
    altitude: 'm',
    force: 'N',
  },
  us: {
    mass: 'oz',
    length: 'in',
    temperature: 'degF',
    pressure: 'inHg',
    volume: 'in3',
    liquidVolume: 'gal',
    density: 'lbPerFt3',
    altitude: 'ft',
    force: 'lbf',
  },
};
/** The presets under their earlier name. */
export const DISPLAY_UNITS = UNIT_PRESETS;

/** Words for each quantity, for a preferences screen and column headers. */
export const QUANTITY_LABELS: Record<Quantity, string> = {
  mass: 'Mass',
  length: 'Length',
  temperature: 'Temperature',
  pressure: 'Pressure and vacuum',
  volume: 'Volume of a piece',
  liquidVolume: 'Volume of resin',
  density: 'Density and resin loading',
  altitude: 'Altitude',
  force: 'Janka hardness',
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
  mL: 'mL',
  L: 'L',
  floz: 'fl oz',
  qt: 'qt',
  gal: 'gal',
  kgPerM3: 'kg/m³',
  gPerCm3: 'g/cm³',
  lbPerFt3: 'lb/ft³',
  m: 'm',
  ft: 'ft',
  N: 'N',
  kN: 'kN',
  lbf: 'lbf',
};

/**
 * Decimals to show when nothing says how precisely a value was entered, chosen so one displayed step
 * is about as fine as a typical shop instrument (0.1 g scale, 0.1 mm caliper, 0.1 cm³ volume, 1 kg/m³)
 * in every unit, so switching units never hides a difference the metric display would show.
 * Pressures get 0.01 kPa or its nearest equivalent.
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
  mL: 0,
  L: 3,
  floz: 1,
  qt: 2,
  gal: 3,
  kgPerM3: 0,
  gPerCm3: 3,
  lbPerFt3: 2,
  m: 0,
  ft: 0,
  N: 0,
  kN: 2,
  lbf: 0,
};

const UNIT_SET: ReadonlySet<string> = new Set(Object.keys(SIZE));

/** Is `unit` one of the units `quantity` may be shown in? */
export function isUnitOf<Q extends Quantity>(quantity: Q, unit: string): unit is UnitOf[Q] {
  return UNIT_SET.has(unit) && (UNITS_OF[quantity] as readonly string[]).includes(unit);
}

/** The full per-quantity choice behind a preset name or a (possibly older, partial) stored choice. */
export function unitPrefs(choice: UnitChoice, overrides?: Partial<UnitPrefs> | null): UnitPrefs {
  const base: UnitPrefs = typeof choice === 'string' ? { ...UNIT_PRESETS[choice] } : { ...choice };
  if (overrides) {
    for (const q of QUANTITIES) {
      const u = overrides[q];
      if (u !== undefined && isUnitOf(q, u)) (base as Record<Quantity, Unit>)[q] = u;
    }
  }
  return base;
}

/** The choices that differ from a preset: what to store for a user who started from that preset. */
export function prefsOverrides(system: UnitSystem, prefs: UnitPrefs): Partial<UnitPrefs> {
  const out: Partial<Record<Quantity, Unit>> = {};
  for (const q of QUANTITIES) if (prefs[q] !== UNIT_PRESETS[system][q]) out[q] = prefs[q];
  return out as Partial<UnitPrefs>;
}

/** The preset a choice equals, or null for a mixed choice. */
export function presetOf(prefs: UnitPrefs): UnitSystem | null {
  return UNIT_SYSTEMS.find((s) => QUANTITIES.every((q) => UNIT_PRESETS[s][q] === prefs[q])) ?? null;
}

function unitFor<Q extends Quantity>(quantity: Q, choice: UnitChoice): UnitOf[Q] {
  return (typeof choice === 'string' ? UNIT_PRESETS[choice][quantity] : choice[quantity]) as UnitOf[Q];
}

export interface DisplayUnit<Q extends Quantity = Quantity> {
  unit: UnitOf[Q];
  label: string;
  decimals: number;
}

/** Unit, label and default decimals a choice shows a quantity with. */
export function displayUnit<Q extends Quantity>(quantity: Q, choice: UnitChoice): DisplayUnit<Q> {
  const unit = unitFor(quantity, choice);
  return { unit, label: UNIT_LABELS[unit], decimals: UNIT_DECIMALS[unit] };
}

/** Canonical (stored) value → the number shown under the given choice. */
export function toDisplay(value: number, quantity: Quantity, choice: UnitChoice): number {
  return convert(quantity, value, CANONICAL_UNITS[quantity], unitFor(quantity, choice));
}

/** Number typed under the given choice → canonical (stored) value. */
export function fromDisplay(value: number, quantity: Quantity, choice: UnitChoice): number {
  return convert(quantity, value, unitFor(quantity, choice), CANONICAL_UNITS[quantity]);
}

// ---------------------------------------------------------------------------------------------
// Precision: a value is shown with as many decimals as it was entered with ("25.10 g" stays 25.10),
// converted to the display unit when that differs, and with enough decimals to see a correction.

/** Most decimals any display asks for; beyond this a double's noise starts to show. */
export const MAX_DECIMALS = 8;

/** How precisely a value was entered: the unit it was typed in and the decimals typed. */
export interface EnteredPrecision {
  unit: Unit;
  decimals: number;
}

/**
 * Decimals typed in a number as text: "25.10" → 2, "25" → 0, "25,1" → 1 (a decimal comma),
 * "1.5e-3" → 4. Null when the text is not a plain number.
 */
export function decimalsOfText(text: string): number | null {
  const t = text.trim().replace(/\s+/g, '');
  const m = /^[-+]?(\d*)(?:[.,](\d*))?(?:[eE]([-+]?\d+))?$/.exec(t);
  if (!m || ((m[1] ?? '') === '' && (m[2] ?? '') === '')) return null;
  const fraction = (m[2] ?? '').length;
  const exponent = m[3] === undefined ? 0 : Number(m[3]);
  return Math.min(MAX_DECIMALS, Math.max(0, fraction - exponent));
}

const clampDecimals = (d: number) => Math.min(MAX_DECIMALS, Math.max(0, d));

/**
 * Decimals to show a value in `unit`. Without an entered precision, the unit's default. Typed in the
 * same unit: the decimals typed. Typed in another unit: the fewest decimals whose step is no coarser
 * than the typed step (0.01 g shown in oz needs 4 decimals, 0.0004 oz ≈ 0.011 g, since 3 would hide it).
 */
export function displayDecimals(unit: Unit, entered?: EnteredPrecision | null): number {
  if (!entered) return UNIT_DECIMALS[unit];
  if (entered.unit === unit) return clampDecimals(entered.decimals);
  const step = 10 ** -entered.decimals * SIZE[entered.unit]; // canonical units
  // The small tolerance stops 10^-d steps that are exact in theory from costing a digit to roundoff.
  return clampDecimals(Math.ceil(Math.log10(SIZE[unit] / step) - 1e-9));
}

/**
 * The fewest decimals, at least `atLeast`, at which two values shown in a unit differ, so a correction
 * (25.1 g → 25.12 g) is visible. Values equal to within roundoff keep `atLeast`.
 */
export function decimalsToSeeChange(a: number, b: number, atLeast: number): number {
  let d = clampDecimals(atLeast);
  if (Math.abs(a - b) <= 1e-12 * Math.max(1, Math.abs(a), Math.abs(b))) return d;
  while (d < MAX_DECIMALS && a.toFixed(d) === b.toFixed(d)) d++;
  return d;
}

/** A number with fixed decimals, without a "-0.0" for values that round to zero. */
export function formatNumber(value: number, decimals: number): string {
  const s = value.toFixed(clampDecimals(decimals));
  return /^-0(\.0*)?$/.test(s) ? s.slice(1) : s;
}

export interface FormatOptions {
  /** How the value was entered, when known; the display follows it. */
  entered?: EnteredPrecision | null;
  /** Fixed decimals, overriding the entered and default precision. */
  decimals?: number;
  /** Append the unit's label (default true). */
  withUnit?: boolean;
}

/** A stored (canonical) value as text in the chosen unit, e.g. "25.10 g" or "0.885 oz"; "—" when missing. */
export function formatQuantity(value: number | null | undefined, quantity: Quantity, choice: UnitChoice, options: FormatOptions = {}): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  const unit = unitFor(quantity, choice);
  const decimals = options.decimals ?? displayDecimals(unit, options.entered);
  const n = formatNumber(toDisplay(value, quantity, choice), decimals);
  return options.withUnit === false ? n : `${n} ${UNIT_LABELS[unit]}`;
}
