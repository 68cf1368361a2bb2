import { describe, expect, it } from 'vitest';
import { DEFAULT_SG_COV, referenceOvenDrySg, sgPlausibility } from './plausibility';

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
