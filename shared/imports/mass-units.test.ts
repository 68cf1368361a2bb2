import { describe, expect, it } from 'vitest';
import { GRAMS_PER_UNIT, readMassUnit, toGrams } from './mass-units';

// Exact factors by definition. Sources beside each row.
describe('mass units to grams', () => {
  it.each([
    ['g', 1, 'SI'],
    ['kg', 1000, 'SI prefix kilo'],
    ['oz', 28.349523125, 'avoirdupois ounce = 1/16 lb; NIST SP 811 (2008) App. B.8'],
    ['lb', 453.59237, 'avoirdupois pound = 0.453 592 37 kg exactly; NIST SP 811 (2008) App. B.8'],
    ['ct', 0.2, 'metric carat = 200 mg; NIST Handbook 44 App. C; NIST SP 811 App. B.8'],
    ['dwt', 1.55517384, 'pennyweight = 24 grains, grain = 64.798 91 mg; NIST Handbook 44 App. C'],
  ] as const)('1 %s = %s g (%s)', (unit, grams, _source) => {
    expect(GRAMS_PER_UNIT[unit]).toBeCloseTo(grams, 12);
    expect(toGrams(2, unit)).toBeCloseTo(2 * grams, 12);
  });

  it('reads the spellings scales print', () => {
    expect(readMassUnit(' G ')).toBe('g');
    expect(readMassUnit('grams')).toBe('g');
    expect(readMassUnit('lbs')).toBe('lb');
    expect(readMassUnit('oz.')).toBe('oz');
    expect(readMassUnit('CT')).toBe('ct');
    expect(readMassUnit('pwt')).toBe('dwt');
    // Grain is refused rather than guessed: "gr" is read as gram by some.
    expect(readMassUnit('gr')).toBeNull();
    expect(readMassUnit('mg')).toBeNull();
  });

  it('knows no unit by the names every object has', () => {
    for (const name of ['constructor', 'toString', '__proto__', 'hasOwnProperty', 'valueOf']) expect(readMassUnit(name)).toBeNull();
  });
});
