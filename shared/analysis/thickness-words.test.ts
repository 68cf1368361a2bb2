import { describe, expect, it } from 'vitest';
import type { Fit } from '../schemas/analysis';
import { fitInLength } from './thickness-words';

// 1 in = 25.4 mm exactly (NIST SP 811, B.8); the rest is arithmetic on an invented fit.
const inch = { label: 'in', mmPer: 25.4 };

const line: Fit = {
  model: 'thickness',
  n: 12,
  coefficients: [
    { name: 'intercept', estimate: 80, se: 4, ci95: [71, 89] },
    { name: 'thickness (mm)', estimate: -0.5, se: 0.1, ci95: [-0.7, -0.3] },
  ],
  r2: 0.4,
  residualSd: 6.2,
  sentence: 'per mm',
  band: [],
};

describe('thickness fits in the reader’s length unit', () => {
  it('speaks per 0.1 in with the slope, its SE and CI per inch', () => {
    const f = fitInLength(line, inch);
    expect(f.coefficients[1]).toEqual({ name: 'thickness (in)', estimate: -12.7, se: 2.54, ci95: [-0.7 * 25.4, -0.3 * 25.4] });
    expect(f.coefficients[0]).toBe(line.coefficients[0]);
    // −0.5 points/mm × 2.54 mm = −1.27 points per 0.1 in; CI −0.7…−0.3 × 2.54 = −1.778…−0.762.
    expect(f.sentence).toContain('WPG falls by about 1.3 points for each 0.1 in of extra thickness (95 % CI −1.8 to −0.8)');
    expect(f.sentence).toContain('accounts for 40 % of the spread (R² = 0.40)');
  });

  it('re-words the fit on SG and thickness together', () => {
    const multiple: Fit = {
      ...line,
      model: 'density+thickness',
      coefficients: [line.coefficients[0]!, { name: 'SG', estimate: -400, se: 30, ci95: [-460, -340] }, line.coefficients[1]!],
    };
    const f = fitInLength(multiple, inch);
    expect(f.sentence).toContain('each 0.1 of SG lowers uptake by about 40.0 points (95 % CI −46.0 to −34.0)');
    expect(f.sentence).toContain('each 0.1 in of thickness lowers it by about 1.27 points (95 % CI −1.78 to −0.76)');
    expect(f.coefficients.map((c) => c.name)).toEqual(['intercept', 'SG', 'thickness (in)']);
  });

  it('leaves a fit in mm, and a fit without thickness, as the server worded it', () => {
    expect(fitInLength(line, { label: 'mm', mmPer: 1 })).toBe(line);
    const sgOnly: Fit = { ...line, model: 'density', coefficients: [line.coefficients[0]!, { name: 'SG', estimate: -400, se: 30, ci95: [-460, -340] }] };
    expect(fitInLength(sgOnly, inch)).toBe(sgOnly);
  });
});
