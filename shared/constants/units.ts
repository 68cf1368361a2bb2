/**
 * Display units a user can choose, per quantity, from a metric or a US preset. Storage is always SI (g, mm,
 * °C, kPa absolute, mL, kg/m³, m, N). The tuples feed the user contract and the database enum; the
 * conversions, labels and presets are in shared/units.ts. Kept free of imports so the sign-in page, which
 * parses the user contract, does not load the conversion tables (decision 0014).
 */
export const UNIT_SYSTEMS = ['metric', 'us'] as const;
export type UnitSystem = (typeof UNIT_SYSTEMS)[number];

/**
 * What a user can choose a unit for. `volume` is a piece's volume (cm³, in³); `liquidVolume` a lot of
 * resin; `density` covers wood and resin densities and resin loading (mass per volume); `altitude` the
 * shop's height; `force` the Janka hardness (Shore D and Brinell are scales, shown as measured).
 */
export const QUANTITIES = ['mass', 'length', 'temperature', 'pressure', 'volume', 'liquidVolume', 'density', 'altitude', 'force'] as const;
export type Quantity = (typeof QUANTITIES)[number];

export const MASS_UNITS = ['g', 'kg', 'oz', 'lb'] as const;
export const LENGTH_UNITS = ['mm', 'cm', 'in'] as const;
export const TEMPERATURE_UNITS = ['degC', 'degF'] as const;
export const PRESSURE_UNITS = ['kPa', 'Pa', 'inHg', 'mmHg', 'torr', 'mbar', 'psi'] as const;
export const VOLUME_UNITS = ['cm3', 'in3'] as const;
export const LIQUID_VOLUME_UNITS = ['mL', 'L', 'floz', 'qt', 'gal'] as const;
export const DENSITY_UNITS = ['kgPerM3', 'gPerCm3', 'lbPerFt3'] as const;
export const ALTITUDE_UNITS = ['m', 'ft'] as const;
export const FORCE_UNITS = ['N', 'kN', 'lbf'] as const;

/** Older names, kept for the callers that use them. */
export { UNIT_SYSTEMS as UNIT_SYSTEMS_LIST, type UnitSystem as UnitSystemName };
