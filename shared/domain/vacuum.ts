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
    throw new DomainError('altitude-out-of-range', 'altitudeM', 'altitudeM must lie in the troposphere of the standard atmosphere (−5 km to 11 km)');
  }
  const ratio = 1 - (LAPSE_RATE_K_PER_M * geopotential) / SEA_LEVEL_TEMPERATURE_K;
  return (SEA_LEVEL_PRESSURE_PA * Math.pow(ratio, PRESSURE_EXPONENT)) / 1000;
}

/**
 * How far the real barometer may stand above the standard atmosphere before a gauge reading beyond the
 * standard ambient is refused: 5 %. Sea-level pressure mostly lies within about 980–1040 hPa, strong
 * highs reach 1050–1060 hPa (+3.6 to +4.6 % on 1013.25 hPa), and the highest ever recorded is about
 * 1084 hPa (+7 %) — climatology figures from memory (WMO weather and climate extremes archive). 5 % also
 * covers a vacuum gauge's usual accuracy of 2–3 % of its span. Our choice; see docs/decisions.
 */
export const WEATHER_ALLOWANCE = 0.05;

/** Plausible range, kPa, for a shop's own barometer (station pressure, not the sea-level figure). */
export const BAROMETER_RANGE_KPA = { min: 50, max: 110 } as const;

export interface ChamberPressure {
  /** Absolute chamber pressure, kPa; never below 0 (see clamped). */
  absoluteKpa: number;
  /** (ambient − absolute)/ambient × 100. */
  percentVacuum: number;
  /** The ambient pressure used, kPa. */
  ambientKpa: number;
  ambientSource: 'barometer' | 'standard-atmosphere';
  /** True when the gauge showed more vacuum than the ambient and the absolute pressure was set to 0. */
  clamped: boolean;
  /** Plain words for a clamped reading; null otherwise. */
  note: string | null;
}

/**
 * Absolute chamber pressure from a vacuum gauge, kPa: P_abs = P_ambient − gauge vacuum (gauge vacuum in kPa,
 * positive below ambient, as a vacuum gauge reads). P_ambient is the shop's barometer reading when given
 * (its station pressure), else the U.S. Standard Atmosphere 1976 at altitudeM. Weather moves the real
 * ambient a few percent, so a gauge may read up to WEATHER_ALLOWANCE beyond the ambient used: the absolute
 * pressure is then taken as 0 with a note (a chamber cannot go below vacuum), and only a reading beyond
 * that is refused as a unit slip or a wrong altitude.
 */
export function chamberPressure(gaugeVacuumKpa: number, where: { altitudeM: number; barometerKpa?: number | null }): ChamberPressure {
  requireFinite(gaugeVacuumKpa, 'gaugeVacuumKpa');
  const standard = standardPressureAtAltitude(where.altitudeM);
  let ambientKpa = standard;
  let ambientSource: ChamberPressure['ambientSource'] = 'standard-atmosphere';
  if (where.barometerKpa != null) {
    requireFinite(where.barometerKpa, 'barometerKpa');
    if (where.barometerKpa < BAROMETER_RANGE_KPA.min || where.barometerKpa > BAROMETER_RANGE_KPA.max) {
      throw new DomainError(
        'pressure-out-of-range',
        'barometerKpa',
        `barometerKpa must be the shop's air pressure, ${BAROMETER_RANGE_KPA.min}–${BAROMETER_RANGE_KPA.max} kPa`,
      );
    }
    ambientKpa = where.barometerKpa;
    ambientSource = 'barometer';
  }
  if (gaugeVacuumKpa < 0) {
    throw new DomainError('negative-pressure', 'gaugeVacuumKpa', 'gaugeVacuumKpa cannot be negative');
  }
  const limit = ambientKpa * (1 + WEATHER_ALLOWANCE);
  if (gaugeVacuumKpa > limit) {
    throw new DomainError(
      'vacuum-exceeds-ambient',
      'gaugeVacuumKpa',
      `gaugeVacuumKpa cannot exceed the ambient pressure (${ambientKpa.toFixed(2)} kPa, ${ambientSource === 'barometer' ? "the shop's barometer" : 'standard atmosphere at this altitude'}) by more than ${WEATHER_ALLOWANCE * 100} % (${limit.toFixed(2)} kPa)`,
    );
  }
  const clamped = gaugeVacuumKpa > ambientKpa;
  const absoluteKpa = clamped ? 0 : ambientKpa - gaugeVacuumKpa;
  return {
    absoluteKpa,
    percentVacuum: ((ambientKpa - absoluteKpa) / ambientKpa) * 100,
    ambientKpa,
    ambientSource,
    clamped,
    note: clamped
      ? `The gauge read ${(gaugeVacuumKpa - ambientKpa).toFixed(2)} kPa more vacuum than the ${ambientSource === 'barometer' ? "shop's barometer" : 'standard atmosphere at this altitude'} (${ambientKpa.toFixed(2)} kPa), as a high-pressure day or gauge error can; the absolute pressure is taken as 0 kPa.${ambientSource === 'barometer' ? '' : " Enter the shop's barometer reading for a truer figure."}`
      : null,
  };
}

/**
 * Absolute chamber pressure, kPa, as chamberPressure (standard atmosphere at altitudeM, or the shop's
 * barometer when given): clamped at 0 within the weather allowance, refused beyond it.
 * U.S. Standard Atmosphere 1976 for the ambient.
 */
export function absolutePressureFromGauge(gaugeVacuumKpa: number, altitudeM: number, barometerKpa?: number | null): number {
  return chamberPressure(gaugeVacuumKpa, { altitudeM, barometerKpa }).absoluteKpa;
}

/**
 * Percent vacuum, %: (P_ambient − P_abs)/P_ambient × 100, pressures in kPa, ambient from the shop's
 * barometer when given, else the standard atmosphere at altitudeM. Negative when the absolute reading is
 * above the ambient, which a high-pressure day can cause; that is reported, not refused.
 */
export function percentVacuum(absoluteKpa: number, altitudeM: number, barometerKpa?: number | null): number {
  requireFinite(absoluteKpa, 'absoluteKpa');
  const ambient = barometerKpa != null ? chamberPressure(0, { altitudeM, barometerKpa }).ambientKpa : standardPressureAtAltitude(altitudeM);
  if (absoluteKpa < 0) {
    throw new DomainError('negative-pressure', 'absoluteKpa', 'absoluteKpa cannot be negative');
  }
  return ((ambient - absoluteKpa) / ambient) * 100;
}

/** Metres per international foot (exact, 1959 agreement; NIST SP 811 App. B). */
const M_PER_FT = 0.3048;

/** Above this altitude, m, an entry is questioned: few workshops stand higher, and feet are a common slip. */
export const ALTITUDE_QUESTION_ABOVE_M = 3000;

/**
 * A question to put to whoever typed an altitude that would make every normal gauge reading impossible,
 * or null. Above ALTITUDE_QUESTION_ABOVE_M the standard ambient is below 70 kPa (20.7 inHg), so a good
 * pump's reading at a low-lying shop would be refused; the usual cause is feet typed as metres (or the
 * other way round). Worded in the unit the altitude is shown in: 'us' for feet (pressure in inHg), 'metric'
 * for metres (kPa), whichever unit the user keeps for pressure.
 */
export function altitudeQuestion(altitudeM: number, system: 'metric' | 'us' = 'metric'): string | null {
  requireFinite(altitudeM, 'altitudeM');
  if (altitudeM <= ALTITUDE_QUESTION_ABOVE_M) return null;
  const ambient = standardPressureAtAltitude(Math.min(altitudeM, 11000));
  const inHg = ambient / 3.386389;
  if (system === 'us') {
    const ft = Math.round(altitudeM / M_PER_FT);
    return `${ft.toLocaleString('en-US')} ft is higher than nearly any workshop: the standard air pressure there is ${inHg.toFixed(1)} inHg, so any gauge reading above that would be refused. Is that really the shop's altitude, in feet?`;
  }
  const m = Math.round(altitudeM);
  return `${m.toLocaleString('en-US')} m is higher than nearly any workshop: the standard air pressure there is ${ambient.toFixed(1)} kPa, so any gauge reading above that would be refused. If you meant ${m.toLocaleString('en-US')} ft, that is ${Math.round(m * M_PER_FT).toLocaleString('en-US')} m.`;
}
