import { DomainError, requireFinite } from './errors';

// U.S. Standard Atmosphere 1976 (NOAA-S/T 76-1562) constants; identical to ISO 2533 below 32 km.
const SEA_LEVEL_PRESSURE_PA = 101325;
const SEA_LEVEL_TEMPERATURE_K = 288.15;
const LAPSE_RATE_K_PER_M = 0.0065;
const STANDARD_GRAVITY = 9.80665; // m/s²
const MOLAR_MASS_AIR = 0.0289644; // kg/mol
const GAS_CONSTANT = 8.31432; // J/(mol·K), the 1976 standard's value, not the current CODATA one
const EARTH_RADIUS_M = 6356766; // effective radius for the geopotential conversion
const PRESSURE_EXPONENT = (STANDARD_GRAVITY * MOLAR_MASS_AIR) / (GAS_CONSTANT * LAPSE_RATE_K_PER_M); // ≈ 5.255876

// The troposphere layer of the standard runs from −5 km (from memory) to the tropopause at 11 km
// geopotential; above it the lapse rate changes and this formula no longer holds.
const MIN_GEOPOTENTIAL_M = -5000;
const MAX_GEOPOTENTIAL_M = 11000;

/**
 * Standard barometric pressure at a shop's altitude, kPa. altitudeM is geometric height above sea level
 * (what a map gives), converted to geopotential H = r₀z/(r₀ + z), r₀ = 6 356 766 m; then
 * P = P₀·(1 − L·H/T₀)^(g₀M₀/(R*L)), P₀ = 101 325 Pa, T₀ = 288.15 K, L = 0.0065 K/m.
 * U.S. Standard Atmosphere 1976 / ISO 2533:1975, troposphere. Weather moves the real barometer by a
 * few percent around this value.
 */
export function standardPressureAtAltitude(altitudeM: number): number {
  requireFinite(altitudeM, 'altitudeM');
  // For z ≤ −r₀ this gives −Infinity or a huge positive H, both rejected by the range check below.
  const geopotential = (EARTH_RADIUS_M * altitudeM) / (EARTH_RADIUS_M + altitudeM);
  // The millimetre of slack keeps the layer edges reachable after the geometric round trip.
  if (geopotential < MIN_GEOPOTENTIAL_M - 1e-3 || geopotential > MAX_GEOPOTENTIAL_M + 1e-3) {
    throw new DomainError(
      'altitude-out-of-range',
      'altitudeM',
      'altitudeM must lie in the troposphere of the standard atmosphere (−5 km to 11 km)',
    );
  }
  const ratio = 1 - (LAPSE_RATE_K_PER_M * geopotential) / SEA_LEVEL_TEMPERATURE_K;
  return (SEA_LEVEL_PRESSURE_PA * Math.pow(ratio, PRESSURE_EXPONENT)) / 1000;
}

/**
 * Absolute chamber pressure, kPa: P_abs = P_ambient(altitude) − gauge vacuum, gauge vacuum in kPa
 * (positive below ambient, as a vacuum gauge reads). Two gauges at different altitudes reading the same
 * vacuum are not at the same absolute pressure, which is why the chamber is recorded as absolute.
 * U.S. Standard Atmosphere 1976 for the ambient.
 */
export function absolutePressureFromGauge(gaugeVacuumKpa: number, altitudeM: number): number {
  requireFinite(gaugeVacuumKpa, 'gaugeVacuumKpa');
  const ambient = standardPressureAtAltitude(altitudeM);
  if (gaugeVacuumKpa < 0) {
    throw new DomainError('negative-pressure', 'gaugeVacuumKpa', 'gaugeVacuumKpa cannot be negative');
  }
  if (gaugeVacuumKpa > ambient) {
    throw new DomainError(
      'vacuum-exceeds-ambient',
      'gaugeVacuumKpa',
      `gaugeVacuumKpa cannot exceed the ambient pressure at this altitude (${ambient.toFixed(2)} kPa)`,
    );
  }
  return ambient - gaugeVacuumKpa;
}

/**
 * Percent vacuum, %: (P_ambient − P_abs)/P_ambient × 100, pressures in kPa, ambient from the standard
 * atmosphere at altitudeM. Negative when the absolute reading is above the standard ambient, which a
 * high-pressure day can cause; that is reported, not refused.
 */
export function percentVacuum(absoluteKpa: number, altitudeM: number): number {
  requireFinite(absoluteKpa, 'absoluteKpa');
  const ambient = standardPressureAtAltitude(altitudeM);
  if (absoluteKpa < 0) {
    throw new DomainError('negative-pressure', 'absoluteKpa', 'absoluteKpa cannot be negative');
  }
  return ((ambient - absoluteKpa) / ambient) * 100;
}
