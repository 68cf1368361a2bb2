import { describe, expect, it } from 'vitest';
import {
  ALTITUDE_UNITS,
  CANONICAL_UNITS,
  DENSITY_UNITS,
  FORCE_UNITS,
  LIQUID_VOLUME_UNITS,
  QUANTITIES,
  UNITS_OF,
  UNIT_DECIMALS,
  UNIT_LABELS,
  UNIT_PRESETS,
  convert,
  convertAltitude,
  convertDensity,
  convertForce,
  convertLiquidVolume,
  decimalsOfText,
  decimalsToSeeChange,
  displayDecimals,
  displayUnit,
  formatNumber,
  formatQuantity,
  fromDisplay,
  isUnitOf,
  prefsOverrides,
  presetOf,
  toDisplay,
  unitPrefs,
  type UnitPrefs,
} from './units';

describe('defining constants of the added quantities', () => {
  // [conversion, computed, exact value, source]
  const rows: [string, number, number, string][] = [
    ['1 ft in m', convertAltitude(1, 'ft', 'm'), 0.3048, 'international foot, 1959 agreement; NIST SP 811 App. B'],
    ['5000 ft in m', convertAltitude(5000, 'ft', 'm'), 1524, 'same'],
    ['1 US gal in mL', convertLiquidVolume(1, 'gal', 'mL'), 3785.411784, 'US gallon = 231 in³ exactly; NIST SP 811 App. B (3.785412 E−03 m³)'],
    ['1 US qt in mL', convertLiquidVolume(1, 'qt', 'mL'), 946.352946, 'gal / 4; NIST SP 811 App. B (9.463529 E−04 m³)'],
    ['1 US fl oz in mL', convertLiquidVolume(1, 'floz', 'mL'), 29.5735295625, 'gal / 128; NIST SP 811 App. B (2.957353 E−05 m³)'],
    ['1 L in mL', convertLiquidVolume(1, 'L', 'mL'), 1000, 'SI'],
    ['1 g/cm³ in kg/m³', convertDensity(1, 'gPerCm3', 'kgPerM3'), 1000, 'SI'],
    ['1 lb/ft³ in kg/m³', convertDensity(1, 'lbPerFt3', 'kgPerM3'), 0.45359237 / 0.3048 ** 3, 'from the definitions; NIST SP 811 App. B lists 1.601846 E+01'],
    ['1 lbf in N', convertForce(1, 'lbf', 'N'), 4.4482216152605, 'lbf = 0.45359237 kg × 9.80665 m/s²; NIST SP 811 App. B (4.448222 E+00)'],
    ['1 kN in N', convertForce(1, 'kN', 'N'), 1000, 'SI'],
  ];
  it.each(rows)('%s = %d to 1e-14  (%s)', (_what, computed, exact) => {
    expect(Math.abs(computed - exact) / exact).toBeLessThan(1e-14);
  });

  it("lb/ft³ agrees with NIST SP 811's rounded 16.01846 kg/m³ to its 7 digits", () => {
    expect(convertDensity(1, 'lbPerFt3', 'kgPerM3')).toBeCloseTo(16.01846, 5);
  });

  it('Wood Handbook side hardness of a table row converts between its lbf and N columns (1 lbf = 4.448 N): 1,290 lbf ≈ 5,740 N', () => {
    // Wood Handbook FPL-GTR-190 Table 5-3a prints hardness in N and lbf; its N column is the lbf column × 4.448 rounded to 10 N.
    expect(Math.round(convertForce(1290, 'lbf', 'N') / 10) * 10).toBe(5740);
  });
});

describe('per-quantity choice', () => {
  it('every quantity has its unit list, a canonical unit in that list, labels and decimals', () => {
    for (const q of QUANTITIES) {
      expect(UNITS_OF[q].length).toBeGreaterThan(0);
      for (const s of ['metric', 'us'] as const) expect(isUnitOf(q, UNIT_PRESETS[s][q])).toBe(true);
      for (const u of UNITS_OF[q]) {
        expect(UNIT_LABELS[u].length).toBeGreaterThan(0);
        expect(Number.isInteger(UNIT_DECIMALS[u])).toBe(true);
      }
    }
    for (const u of [...LIQUID_VOLUME_UNITS, ...DENSITY_UNITS, ...ALTITUDE_UNITS, ...FORCE_UNITS]) expect(UNIT_LABELS[u]).toBeTruthy();
  });

  it('a unit of another quantity is not accepted', () => {
    expect(isUnitOf('mass', 'in')).toBe(false);
    expect(isUnitOf('altitude', 'mm')).toBe(false);
    expect(isUnitOf('density', 'gPerCm3')).toBe(true);
    expect(isUnitOf('mass', 'toString')).toBe(false);
  });

  const gramScaleUsShop = unitPrefs('us', { mass: 'g', density: 'gPerCm3' });

  it('a US shop with a gram scale: mass in g, lengths in in, °F, inHg, g/cm³', () => {
    expect(gramScaleUsShop).toMatchObject({ mass: 'g', length: 'in', temperature: 'degF', pressure: 'inHg', density: 'gPerCm3', altitude: 'ft' });
    expect(formatQuantity(25.1, 'mass', gramScaleUsShop)).toBe('25.1 g');
    expect(formatQuantity(25.4, 'length', gramScaleUsShop)).toBe('1.000 in');
    expect(formatQuantity(121.1111111, 'temperature', gramScaleUsShop)).toBe('250.0 °F');
    expect(formatQuantity(550, 'density', gramScaleUsShop)).toBe('0.550 g/cm³');
    expect(formatQuantity(1524, 'altitude', gramScaleUsShop)).toBe('5000 ft');
  });

  it('overrides that are not units of their quantity are ignored, so a stale stored choice cannot break a screen', () => {
    const p = unitPrefs('metric', { mass: 'in' as never, force: 'lbf' });
    expect(p.mass).toBe('g');
    expect(p.force).toBe('lbf');
  });

  it('stores only what differs from the preset, and recognises a preset', () => {
    expect(prefsOverrides('us', gramScaleUsShop)).toEqual({ mass: 'g', density: 'gPerCm3' });
    expect(prefsOverrides('us', unitPrefs('us'))).toEqual({});
    expect(presetOf(unitPrefs('us'))).toBe('us');
    expect(presetOf(unitPrefs('metric'))).toBe('metric');
    expect(presetOf(gramScaleUsShop)).toBeNull();
  });

  it('display functions take a preset name or a full choice alike', () => {
    const full: UnitPrefs = unitPrefs('us');
    for (const q of QUANTITIES) {
      expect(displayUnit(q, full)).toEqual(displayUnit(q, 'us'));
      expect(toDisplay(123.4, q, full)).toBe(toDisplay(123.4, q, 'us'));
      expect(fromDisplay(toDisplay(123.4, q, full), q, full)).toBeCloseTo(123.4, 10);
    }
  });

  // [quantity, stored (canonical), unit, shown]
  const rows: [(typeof QUANTITIES)[number], number, string, number][] = [
    ['liquidVolume', 3785.411784, 'gal', 1],
    ['liquidVolume', 1900, 'L', 1.9],
    ['density', 1000, 'gPerCm3', 1],
    ['density', 16.018463373960138, 'lbPerFt3', 1],
    ['altitude', 304.8, 'ft', 1000],
    ['force', 4.4482216152605, 'lbf', 1],
  ];
  it.each(rows)('%s: stored %d shows as %d %s', (q, stored, unit, shown) => {
    const choice = unitPrefs('metric', { [q]: unit } as Partial<UnitPrefs>);
    expect(toDisplay(stored, q, choice)).toBeCloseTo(shown, 10);
    expect(fromDisplay(shown, q, choice)).toBeCloseTo(stored, 10);
    expect(convert(q, shown, unit as never, CANONICAL_UNITS[q] as never)).toBeCloseTo(stored, 10);
  });
});

describe('shown precision follows what was entered', () => {
  // [typed text, decimals]
  const typed: [string, number | null][] = [
    ['25.10', 2],
    ['25', 0],
    ['25.', 0],
    ['25,1', 1],
    [' 0.500 ', 3],
    ['.5', 1],
    ['1.5e-3', 4],
    ['2.5E2', 0],
    ['abc', null],
    ['', null],
    ['.', null],
  ];
  it.each(typed)('"%s" was typed with %s decimals', (text, d) => {
    expect(decimalsOfText(text)).toBe(d);
  });

  it('25.10 g stays 25.10 g, and 25.1 g stays 25.1 g', () => {
    expect(formatQuantity(25.1, 'mass', 'metric', { entered: { unit: 'g', decimals: 2 } })).toBe('25.10 g');
    expect(formatQuantity(25.1, 'mass', 'metric', { entered: { unit: 'g', decimals: 1 } })).toBe('25.1 g');
  });

  // [entered unit, entered decimals, shown unit, decimals shown] — the shown step is never coarser than the typed step.
  const across: [string, number, string, number][] = [
    ['g', 2, 'oz', 4], // 0.01 g = 0.00035 oz: 3 decimals (0.001 oz = 0.028 g) would hide it
    ['g', 1, 'oz', 3], // 0.1 g = 0.0035 oz
    ['g', 0, 'oz', 2],
    ['mm', 1, 'in', 3], // 0.1 mm = 0.0039 in
    ['in', 3, 'mm', 2], // 0.001 in = 0.0254 mm
    ['degC', 1, 'degF', 1], // 0.1 °C = 0.18 °F: 0.1 °F is finer
    ['degF', 0, 'degC', 1],
    ['inHg', 2, 'kPa', 2], // 0.01 inHg = 0.034 kPa
    ['kgPerM3', 0, 'gPerCm3', 3],
    ['ft', 0, 'm', 1],
  ];
  it.each(across)('typed in %s with %d decimals, shown in %s with %d', (from, d, to, shown) => {
    expect(displayDecimals(to as never, { unit: from as never, decimals: d })).toBe(shown);
  });
  it('typed in oz with 3 decimals, shown in g with 2 (0.001 oz = 0.028 g)', () => {
    expect(displayDecimals('g', { unit: 'oz', decimals: 3 })).toBe(2);
  });

  it("without an entered precision, the unit's default decimals", () => {
    expect(displayDecimals('g')).toBe(1);
    expect(formatQuantity(25.1234, 'mass', 'metric')).toBe('25.1 g');
  });

  it('a correction shows enough digits to see its size', () => {
    expect(decimalsToSeeChange(25.1, 25.12, 1)).toBe(2);
    expect(decimalsToSeeChange(25.1, 25.6, 1)).toBe(1);
    expect(decimalsToSeeChange(25.1, 25.1, 1)).toBe(1);
    expect(decimalsToSeeChange(0.88531, 0.88549, 3)).toBe(4);
    expect(decimalsToSeeChange(1, 1 + 1e-13, 0)).toBe(0);
  });

  it('no "-0.0" for a value that rounds to zero, and a missing value is a dash', () => {
    expect(formatNumber(-0.01, 1)).toBe('0.0');
    expect(formatNumber(-0.4, 0)).toBe('0');
    expect(formatNumber(-1.25, 1)).toBe('-1.3');
    expect(formatQuantity(null, 'mass', 'us')).toBe('—');
    expect(formatQuantity(Number.NaN, 'mass', 'us')).toBe('—');
    expect(formatQuantity(28.349523125, 'mass', 'us', { withUnit: false })).toBe('1.000');
  });
});
