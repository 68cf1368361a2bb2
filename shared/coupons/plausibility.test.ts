import { describe, expect, it } from 'vitest';
import { speciesRowProblems } from '../schemas/reference';
import { DEFAULT_SG_COV, referenceOvenDrySg, sgPlausibility, sgWarningText } from './plausibility';

const none = { basicSg: null, sg12: null, measuredDensityKgM3: null, measuredMoisturePct: null, sgCoefficientOfVariation: null };

describe('the species reference for a dry coupon', () => {
  it('adjusts basic SG to 0 % MC: G_0 = G_b / (1 − 0.265 G_b) (Wood Handbook ch. 4)', () => {
    expect(referenceOvenDrySg({ ...none, basicSg: 0.49 })).toBeCloseTo(0.49 / (1 - 0.265 * 0.49), 12);
  });

  it('falls back to SG at 12 % MC, then to a shop-measured density', () => {
    const fromSg12 = referenceOvenDrySg({ ...none, sg12: 0.54 });
    const gb = 0.54 / (1 + 0.265 * 0.6 * 0.54);
    expect(fromSg12).toBeCloseTo(gb / (1 - 0.265 * gb), 12);
    // 540 kg/m³ at 8 % MC → G_8 = 0.5
    const g8 = 540 / (1000 * 1.08);
    const gb8 = g8 / (1 + 0.265 * (22 / 30) * g8);
    expect(referenceOvenDrySg({ ...none, measuredDensityKgM3: 540, measuredMoisturePct: 8 })).toBeCloseTo(gb8 / (1 - 0.265 * gb8), 12);
    expect(referenceOvenDrySg(none)).toBeNull();
  });

  it('flags a measured SG more than 3 SD from the reference, with the 10 % default CV or the species’ own', () => {
    const ref = 0.49 / (1 - 0.265 * 0.49);
    const sd = DEFAULT_SG_COV * ref;
    expect(sgPlausibility(ref + 2.9 * sd, { ...none, basicSg: 0.49 })?.plausible).toBe(true);
    expect(sgPlausibility(ref + 3.1 * sd, { ...none, basicSg: 0.49 })?.plausible).toBe(false);
    expect(sgPlausibility(ref - 3.1 * sd, { ...none, basicSg: 0.49 })?.z).toBeCloseTo(-3.1, 10);
    expect(sgPlausibility(ref + 3.1 * sd, { ...none, basicSg: 0.49, sgCoefficientOfVariation: 0.2 })?.plausible).toBe(true);
  });
});

describe('a species row that describes no possible wood is not skipped in silence', () => {
  it('a shop-measured density at the schema maximum (1600 kg/m³ at 0 % MC) answers "could not be checked", not null', () => {
    // 1600 kg/m³ dry is SG 1.6, denser than cell-wall substance (about 1.5): no reference exists.
    const p = sgPlausibility(0.6, { ...none, measuredDensityKgM3: 1600, measuredMoisturePct: 0 });
    expect(p).toMatchObject({ plausible: false, referenceSg: null, z: null });
    expect(sgWarningText(0.6, p!)).toMatch(/could not be checked: the species' reference density describes no possible wood/);
    // A row without density data still has nothing to say.
    expect(sgPlausibility(0.6, none)).toBeNull();
  });

  it('the species form refuses such a row, naming the field', () => {
    const base = { origin: 'shop-measured' as const };
    expect(speciesRowProblems({ ...base, measuredDensityKgM3: 1600, measuredMoisturePct: 0 }).measuredDensityKgM3?.[0]).toMatch(/no possible wood/);
    expect(speciesRowProblems({ ...base, measuredDensityKgM3: 1600, measuredMoisturePct: 12 }).measuredDensityKgM3?.[0]).toMatch(/no possible wood/);
    expect(speciesRowProblems({ ...base, measuredDensityKgM3: 700, measuredMoisturePct: 12 })).toEqual({});
    expect(speciesRowProblems({ origin: 'handbook', basicSg: 1.2 }).basicSg?.[0]).toMatch(/no possible wood/);
  });
});
