import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { readReferenceCsv } from '../tests/reference/read-reference';
import {
  CM3_PER_IN3,
  LENGTH_UNITS,
  MASS_UNITS,
  PA_PER_INHG,
  PA_PER_MMHG,
  PA_PER_PSI,
  PA_PER_TORR,
  PRESSURE_UNITS,
  QUANTITIES,
  TEMPERATURE_UNITS,
  UNIT_DECIMALS,
  UNIT_LABELS,
  UNIT_SYSTEMS,
  VOLUME_UNITS,
  convert,
  convertLength,
  convertMass,
  convertPressure,
  convertTemperature,
  convertVolume,
  displayUnit,
  fromDisplay,
  toDisplay,
} from './units';

describe('exact defining constants', () => {
  // [conversion, computed, exact value, source]
  const rows: [string, number, number, string][] = [
    ['1 in in mm', convertLength(1, 'in', 'mm'), 25.4, 'international inch, 1959 agreement; NIST SP 811 App. B'],
    ['1 in in cm', convertLength(1, 'in', 'cm'), 2.54, 'same'],
    ['1 lb in g', convertMass(1, 'lb', 'g'), 453.59237, 'international avoirdupois pound, 1959; NIST SP 811 App. B'],
    ['1 oz in g', convertMass(1, 'oz', 'g'), 28.349523125, '1 oz = 1/16 lb exactly; NIST SP 811 App. B'],
    ['1 kg in lb', convertMass(1, 'kg', 'lb'), 1 / 0.45359237, 'inverse of the pound definition'],
    ['1 inHg in Pa', convertPressure(1, 'inHg', 'Pa'), 3386.389, 'NIST SP 811 App. B, conventional inHg 3.386389E+03'],
    ['1 mmHg in Pa', convertPressure(1, 'mmHg', 'Pa'), 133.322387415, 'conventional mmHg = 13.5951 g/cm³ × 9.80665 m/s² × 1 mm'],
    ['1 torr in Pa', convertPressure(1, 'torr', 'Pa'), 101325 / 760, 'CGPM 1954: 1 atm = 101 325 Pa = 760 torr'],
    ['760 torr in kPa', convertPressure(760, 'torr', 'kPa'), 101.325, 'CGPM 1954 standard atmosphere'],
    ['1 psi in Pa', convertPressure(1, 'psi', 'Pa'), 6894.757293168361, 'lbf = 0.45359237 kg × 9.80665 m/s² (CGPM 1901), over (0.0254 m)²'],
    ['1 mbar in Pa', convertPressure(1, 'mbar', 'Pa'), 100, 'SI: 1 bar = 10⁵ Pa'],
    ['1 in³ in cm³', convertVolume(1, 'in3', 'cm3'), 16.387064, '2.54³ exactly'],
    ['0 °C in °F', convertTemperature(0, 'degC', 'degF'), 32, '°F = °C × 9/5 + 32 (NIST SP 811 App. B)'],
    ['100 °C in °F', convertTemperature(100, 'degC', 'degF'), 212, 'same'],
    ['−40 °F in °C', convertTemperature(-40, 'degF', 'degC'), -40, 'same, the crossing point'],
    ['103 °C in °F', convertTemperature(103, 'degC', 'degF'), 217.4, 'same; oven-dry temperature of ASTM D4442'],
  ];
  it.each(rows)('%s = %d exactly, to the last bit or within 1 ulp  (%s)', (_what, computed, exact) => {
    expect(Math.abs(computed - exact)).toBeLessThanOrEqual(2 * Number.EPSILON * Math.abs(exact));
  });

  it('psi agrees with the rounded SP 811 factor 6894.757293168 to 1e-13', () => {
    expect(Math.abs(PA_PER_PSI - 6894.757293168) / 6894.757293168).toBeLessThan(1e-13);
  });

  it('the SP 811 inHg factor and 25.4 conventional mmHg differ by less than 1.1e-7 (NIST SP 811; CGPM)', () => {
    expect(Math.abs(PA_PER_INHG - 25.4 * PA_PER_MMHG) / PA_PER_INHG).toBeLessThan(1.1e-7);
    expect(PA_PER_TORR).toBe(101325 / 760);
    expect(CM3_PER_IN3).toBeCloseTo(16.387064, 12);
  });

  const pressureRows = readReferenceCsv('./pressure-units.csv');
  const unitOf: Record<string, 'torr' | 'mmHg' | 'psi' | 'kPa' | 'mbar'> = {
    torr: 'torr',
    'mmHg (conventional)': 'mmHg',
    'psi (lbf/in2)': 'psi',
    kPa: 'kPa',
    'hPa (= mbar)': 'mbar',
  };
  it.each(pressureRows.filter((r) => (r.unit as string) in unitOf).map((r) => [r.unit, Number(r.pascal_per_unit), r.note] as const))(
    'reference table: 1 %s = %d Pa to 1e-12  (CGPM 1954; NIST SP 811 — %s)',
    (unit, pa) => {
      const id = unitOf[unit as string] as 'torr' | 'mmHg' | 'psi' | 'kPa' | 'mbar';
      expect(Math.abs(convertPressure(1, id, 'Pa') - pa) / pa).toBeLessThan(1e-12);
    },
  );

  it('the standard atmosphere is 29.9213 inHg and 14.6959 psi (reference table, derived from CGPM 1954)', () => {
    expect(convertPressure(101.325, 'kPa', 'inHg')).toBeCloseTo(29.9212555797, 5);
    expect(convertPressure(101.325, 'kPa', 'psi')).toBeCloseTo(14.6959487755, 9);
  });
});

describe('round trips (fast-check)', () => {
  const value = fc.double({ min: -1e6, max: 1e6, noNaN: true });
  const pairs = <U extends string>(units: readonly U[]) => fc.tuple(fc.constantFrom(...units), fc.constantFrom(...units));
  const close = (a: number, b: number) => Math.abs(a - b) <= 1e-12 * Math.max(1, Math.abs(b));

  it('mass, length, pressure, volume and temperature convert there and back', () => {
    fc.assert(
      fc.property(
        value,
        pairs(MASS_UNITS),
        pairs(LENGTH_UNITS),
        pairs(PRESSURE_UNITS),
        pairs(VOLUME_UNITS),
        pairs(TEMPERATURE_UNITS),
        (v, [m1, m2], [l1, l2], [p1, p2], [v1, v2], [t1, t2]) => {
          expect(close(convertMass(convertMass(v, m1, m2), m2, m1), v)).toBe(true);
          expect(close(convertLength(convertLength(v, l1, l2), l2, l1), v)).toBe(true);
          expect(close(convertPressure(convertPressure(v, p1, p2), p2, p1), v)).toBe(true);
          expect(close(convertVolume(convertVolume(v, v1, v2), v2, v1), v)).toBe(true);
          expect(close(convertTemperature(convertTemperature(v, t1, t2), t2, t1), v)).toBe(true);
        },
      ),
    );
  });

  it('toDisplay and fromDisplay are inverses for every quantity and unit system', () => {
    fc.assert(
      fc.property(value, fc.constantFrom(...QUANTITIES), fc.constantFrom(...UNIT_SYSTEMS), (v, q, system) => {
        expect(close(fromDisplay(toDisplay(v, q, system), q, system), v)).toBe(true);
      }),
    );
  });

  it('conversions are monotone: a larger value stays larger', () => {
    fc.assert(
      fc.property(value, value, pairs(PRESSURE_UNITS), (a, b, [from, to]) => {
        fc.pre(a < b);
        expect(convertPressure(a, from, to)).toBeLessThanOrEqual(convertPressure(b, from, to));
      }),
    );
  });
});

describe('display helpers', () => {
  it('lists the two unit systems', () => {
    expect(UNIT_SYSTEMS).toEqual(['metric', 'us']);
  });

  // [quantity, system, stored value, shown value, unit label]
  const rows: [(typeof QUANTITIES)[number], (typeof UNIT_SYSTEMS)[number], number, number, string][] = [
    ['mass', 'metric', 250, 250, 'g'],
    ['mass', 'us', 453.59237, 16, 'oz'],
    ['length', 'us', 25.4, 1, 'in'],
    ['temperature', 'us', 121, 249.8, '°F'],
    ['pressure', 'us', 3.386389, 1, 'inHg'],
    ['pressure', 'metric', 2.5, 2.5, 'kPa'],
    ['volume', 'us', 16.387064, 1, 'in³'],
  ];
  it.each(rows)('%s in %s: stored %d shows as %d %s', (q, system, stored, shown, label) => {
    expect(toDisplay(stored, q, system)).toBeCloseTo(shown, 10);
    expect(fromDisplay(shown, q, system)).toBeCloseTo(stored, 10);
    expect(displayUnit(q, system).label).toBe(label);
  });

  it('every unit has a label and a whole number of decimals', () => {
    const all = [...MASS_UNITS, ...LENGTH_UNITS, ...TEMPERATURE_UNITS, ...PRESSURE_UNITS, ...VOLUME_UNITS];
    for (const u of all) {
      expect(UNIT_LABELS[u].length).toBeGreaterThan(0);
      expect(Number.isInteger(UNIT_DECIMALS[u])).toBe(true);
    }
  });

  it('the generic convert dispatches by quantity', () => {
    expect(convert('mass', 1, 'lb', 'oz')).toBeCloseTo(16, 12);
    expect(convert('temperature', 200, 'degF', 'degC')).toBeCloseTo(93.333333, 5);
  });
});
