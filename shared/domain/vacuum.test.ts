import { describe, expect, it } from 'vitest';
import { readReferenceCsv } from '../../tests/reference/read-reference';
import { convertPressure } from '../units';
import { absolutePressureFromGauge, percentVacuum, standardPressureAtAltitude } from './index';
import { GAUGE_DROP_INHG_PER_1000_FT } from './rules-of-thumb';

const R0 = 6356766; // U.S. Standard Atmosphere 1976 effective Earth radius, m
/** Geometric height for a geopotential altitude: z = r₀H/(r₀ − H) (U.S. Standard Atmosphere 1976). */
const geometricFromGeopotential = (h: number) => (R0 * h) / (R0 - h);

describe('standardPressureAtAltitude (U.S. Standard Atmosphere 1976 / ISO 2533 troposphere)', () => {
  const rows = readReferenceCsv('./standard-atmosphere-1976.csv');
  it.each(rows.map((r) => [Number(r.altitude_m), Number(r.pressure_Pa_table), Number(r.pressure_Pa_formula)] as const))(
    'geopotential %d m → table %d Pa within 0.01 kPa; formula column %d Pa within 0.001 kPa',
    (h, table, formula) => {
      const kpa = standardPressureAtAltitude(geometricFromGeopotential(h));
      expect(Math.abs(kpa - table / 1000)).toBeLessThanOrEqual(0.01);
      expect(Math.abs(kpa - formula / 1000)).toBeLessThanOrEqual(0.001);
    },
  );

  it('treats its argument as geometric height: 3000 m on a map is 2998.6 m geopotential, 0.016 kPa higher (USSA 1976)', () => {
    const atMapHeight = standardPressureAtAltitude(3000);
    const tableAtGeopotential3000 = 70.1085; // USSA 1976 table, 3000 m geopotential
    expect(atMapHeight - tableAtGeopotential3000).toBeGreaterThan(0.01);
    expect(atMapHeight - tableAtGeopotential3000).toBeLessThan(0.02);
  });

  it('sea level is the standard atmosphere, 101.325 kPa exactly (CGPM 1954)', () => {
    expect(standardPressureAtAltitude(0)).toBe(101.325);
  });

  it(`a gauge reads about ${GAUGE_DROP_INHG_PER_1000_FT} inHg less per 1,000 ft (common practice, no published source; ±0.15 inHg)`, () => {
    const ft = 0.3048;
    for (const startFt of [0, 1000, 3000, 5000]) {
      const drop = convertPressure(
        standardPressureAtAltitude(startFt * ft) - standardPressureAtAltitude((startFt + 1000) * ft),
        'kPa',
        'inHg',
      );
      expect(Math.abs(drop - GAUGE_DROP_INHG_PER_1000_FT)).toBeLessThanOrEqual(0.15);
    }
  });
});

describe('absolutePressureFromGauge / percentVacuum', () => {
  // [gauge vacuum kPa, altitude m, absolute kPa, % vacuum, source]
  const rows: [number, number, number, number, string][] = [
    [0, 0, 101.325, 0, 'no vacuum: absolute = ambient; USSA 1976 sea level'],
    [100, 0, 1.325, 98.69225265235629, 'by hand: 101.325 − 100; (100/101.325)·100'],
    [101.325, 0, 0, 100, 'full vacuum at sea level'],
    [80, geometricFromGeopotential(1500), 4.556, 94.6118, 'USSA 1976 table 84.556 kPa at 1500 m geopotential; by hand'],
  ];
  it.each(rows)('gauge %d kPa at %d m → %d kPa absolute, %d pct vacuum  (%s)', (gauge, alt, abs, pct) => {
    const absolute = absolutePressureFromGauge(gauge, alt);
    expect(absolute).toBeCloseTo(abs, 3);
    expect(percentVacuum(absolute, alt)).toBeCloseTo(pct, 3);
  });

  it('the same gauge reading is a different absolute pressure at altitude (USSA 1976)', () => {
    const gauge = convertPressure(24, 'inHg', 'kPa');
    expect(absolutePressureFromGauge(gauge, 1609.344) - absolutePressureFromGauge(gauge, 0)).toBeLessThan(-15);
  });

  it('an absolute reading above the standard ambient (a high-pressure day) gives a negative % vacuum, not an error', () => {
    expect(percentVacuum(102, 0)).toBeLessThan(0);
  });
});
