import { describe, expect, it } from 'vitest';
import { readReferenceCsv } from '../../tests/reference/read-reference';
import { convertAltitude, convertPressure } from '../units';
import { absolutePressureFromGauge, altitudeQuestion, chamberPressure, percentVacuum, standardPressureAtAltitude } from './index';
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
      const drop = convertPressure(standardPressureAtAltitude(startFt * ft) - standardPressureAtAltitude((startFt + 1000) * ft), 'kPa', 'inHg');
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

describe('gauge readings above the standard ambient: the weather allowance, the clamp and the barometer', () => {
  // Standard ambient (USSA 1976): 101.325 kPa at sea level, 97.72 kPa at 1,000 ft, 84.31 kPa at 5,000 ft.
  // 1 inHg = 3.386389 kPa (NIST SP 811). Each reading below is above that ambient but within 5 %.
  const inHg = (v: number) => v * 3.386389;
  const ft = (v: number) => v * 0.3048;
  it.each([
    [29.95, 0, 'sea level'],
    [29, ft(1000), '1,000 ft'],
    [25, ft(5000), '5,000 ft'],
  ])('%d inHg at %d m (%s) is accepted: absolute 0 kPa with a note, 100 %% vacuum', (gauge, altitudeM) => {
    const p = chamberPressure(inHg(gauge), { altitudeM });
    expect(p.clamped).toBe(true);
    expect(p.absoluteKpa).toBe(0);
    expect(p.percentVacuum).toBe(100);
    expect(p.note).toMatch(/taken as 0 kPa\. Enter the shop's barometer reading/);
    expect(absolutePressureFromGauge(inHg(gauge), altitudeM)).toBe(0);
  });

  it('refuses a reading more than 5 % beyond the ambient (a unit slip or a wrong altitude)', () => {
    expect(() => chamberPressure(101.325 * 1.051, { altitudeM: 0 })).toThrow(expect.objectContaining({ code: 'vacuum-exceeds-ambient' }));
    expect(chamberPressure(101.325 * 1.049, { altitudeM: 0 }).clamped).toBe(true);
  });

  it("uses the shop's barometer reading instead of the standard atmosphere when it has one", () => {
    // A high-pressure day at sea level: the barometer reads 103.5 kPa; the gauge 100 kPa → 3.5 kPa absolute (by hand).
    const p = chamberPressure(100, { altitudeM: 0, barometerKpa: 103.5 });
    expect(p).toMatchObject({ ambientKpa: 103.5, ambientSource: 'barometer', clamped: false, note: null });
    expect(p.absoluteKpa).toBeCloseTo(3.5, 12);
    expect(p.percentVacuum).toBeCloseTo((100 / 103.5) * 100, 12);
    expect(percentVacuum(3.5, 0, 103.5)).toBeCloseTo(p.percentVacuum, 12);
    // Without it, the same gauge at sea level reads 1.325 kPa absolute against the standard 101.325.
    expect(absolutePressureFromGauge(100, 0)).toBeCloseTo(1.325, 12);
  });
});

describe('an altitude that makes every normal reading impossible is questioned', () => {
  const ft = (v: number) => v * 0.3048;
  it('questions 5,000 typed as metres by a metric user, offering the feet reading (5,000 ft = 1,524 m)', () => {
    expect(altitudeQuestion(5000, 'metric')).toMatch(
      /5,000 m is higher than nearly any workshop: the standard air pressure there is 54\.0 kPa.*If you meant 5,000 ft, that is 1,524 m\./,
    );
    expect(altitudeQuestion(ft(15000), 'us')).toMatch(/15,000 ft is higher than nearly any workshop.*Is that really the shop's altitude, in feet\?/);
    expect(altitudeQuestion(1500, 'metric')).toBeNull();
    expect(altitudeQuestion(ft(1500), 'us')).toBeNull();
  });

  it('a US shop at 1,500 ft is stored as 457.2 m, not 1,500 m (1 ft = 0.3048 m exactly, NIST SP 811)', () => {
    expect(convertAltitude(1500, 'ft', 'm')).toBeCloseTo(457.2, 10);
    expect(convertAltitude(457.2, 'm', 'ft')).toBeCloseTo(1500, 10);
    // The stored 457.2 m puts the standard ambient at 95.95 kPa; 1,500 m (the slip) would give 84.56 kPa.
    expect(standardPressureAtAltitude(457.2)).toBeCloseTo(95.95, 2);
    expect(standardPressureAtAltitude(1500)).toBeCloseTo(84.56, 2);
  });
});
