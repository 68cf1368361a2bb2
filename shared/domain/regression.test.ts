import MultivariateLinearRegression from 'ml-regression-multivariate-linear';
import { linearRegression } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { readNistData, readReferenceCsv } from '../../tests/reference/read-reference';
import { fitLinear, fitMultiple, fitMultipleColumns } from './index';

/** NIST's log relative error: the number of correct significant digits. */
const lre = (computed: number, certified: number) => (computed === certified ? Infinity : -Math.log10(Math.abs(computed - certified) / Math.abs(certified)));

interface Certified {
  estimates: number[];
  sds: number[];
  residualSd: number;
  r2: number;
}

function certified(dataset: string): Certified {
  const rows = readReferenceCsv('./nist-strd/certified-values.csv').filter((r) => r.dataset === dataset);
  const first = rows[0];
  if (first === undefined) throw new Error(`no certified values for ${dataset}`);
  return {
    estimates: rows.map((r) => Number(r.estimate)),
    sds: rows.map((r) => Number(r.std_dev_of_estimate)),
    residualSd: Number(first.residual_std_dev),
    r2: Number(first.r_squared),
  };
}

describe('fitLinear on NIST StRD Norris (certified values; at least 9 significant digits required)', () => {
  const data = readNistData('./nist-strd/Norris.dat'); // columns y, x
  const y = data.map((r) => r[0] as number);
  const x = data.map((r) => r[1] as number);
  const c = certified('Norris');
  const fit = fitLinear(x, y);
  // [quantity, computed, certified]
  const rows: [string, number, number][] = [
    ['B0 (intercept)', fit.intercept, c.estimates[0] as number],
    ['B1 (slope)', fit.slope, c.estimates[1] as number],
    ['SD(B0)', fit.interceptSe, c.sds[0] as number],
    ['SD(B1)', fit.slopeSe, c.sds[1] as number],
    ['residual SD', fit.residualSd, c.residualSd],
    ['R²', fit.r2, c.r2],
  ];
  it.each(rows)('%s: %d vs certified %d, LRE ≥ 9 (NIST StRD Norris)', (_q, computed, cert) => {
    expect(lre(computed, cert)).toBeGreaterThanOrEqual(9);
  });

  it('counts the 36 observations and agrees with simple-statistics linearRegression (second library)', () => {
    expect(fit.n).toBe(36);
    const ss = linearRegression(x.map((xi, i) => [xi, y[i] as number]));
    expect(lre(fit.slope, ss.m)).toBeGreaterThanOrEqual(11);
    expect(lre(fit.intercept, ss.b)).toBeGreaterThanOrEqual(9);
  });

  it('fitMultiple with the single predictor gives the same certified values (NIST StRD Norris)', () => {
    const m = fitMultiple(
      x.map((xi) => [xi]),
      y,
    );
    [...m.coefficients, ...m.standardErrors, m.residualSd, m.r2].forEach((v, i) => {
      const cert = [...c.estimates, ...c.sds, c.residualSd, c.r2][i] as number;
      expect(lre(v, cert)).toBeGreaterThanOrEqual(9);
    });
  });
});

describe('fitMultiple on NIST StRD Longley (certified values; at least 7 significant digits required)', () => {
  const data = readNistData('./nist-strd/Longley.dat'); // columns y, x1 … x6
  const y = data.map((r) => r[0] as number);
  const rows = data.map((r) => r.slice(1));
  const c = certified('Longley');
  const fit = fitMultiple(rows, y);

  const table: [string, number, number][] = [
    ...c.estimates.map((e, i): [string, number, number] => [`B${i}`, fit.coefficients[i] as number, e]),
    ...c.sds.map((s, i): [string, number, number] => [`SD(B${i})`, fit.standardErrors[i] as number, s]),
    ['residual SD', fit.residualSd, c.residualSd],
    ['R²', fit.r2, c.r2],
  ];
  it.each(table)('%s: %d vs certified %d, LRE ≥ 7 (NIST StRD Longley)', (_q, computed, cert) => {
    expect(lre(computed, cert)).toBeGreaterThanOrEqual(7);
  });

  it('gives exactly the same numbers when the predictors come as columns (fitMultipleColumns)', () => {
    const columns = (rows[0] as number[]).map((_v, j) => rows.map((r) => r[j] as number));
    expect(fitMultipleColumns(columns, y)).toEqual(fit);
    expect(fitMultipleColumns([Float64Array.from(columns[0] as number[]), ...columns.slice(1)], y)).toEqual(fit);
  });

  it('counts 16 observations and 7 coefficients', () => {
    expect(fit.n).toBe(16);
    expect(fit.coefficients).toHaveLength(7);
    expect(fit.standardErrors).toHaveLength(7);
  });

  it('is why QR is used: the normal-equations library keeps fewer than 7 digits on Longley', () => {
    const lib = new MultivariateLinearRegression(
      rows,
      y.map((v) => [v]),
    );
    // The library puts the intercept last.
    const libIntercept = lib.weights[6]?.[0] as number;
    expect(lre(libIntercept, c.estimates[0] as number)).toBeLessThan(7);
  });
});

describe('fitMultiple on a small exact case', () => {
  it('recovers y = 1 + 2·x1 − 3·x2 exactly with zero residual (by hand)', () => {
    const rows = [
      [0, 0],
      [1, 0],
      [0, 1],
      [1, 1],
      [2, 3],
    ];
    const y = rows.map(([a, b]) => 1 + 2 * (a as number) - 3 * (b as number));
    const fit = fitMultiple(rows, y);
    expect(fit.coefficients[0]).toBeCloseTo(1, 12);
    expect(fit.coefficients[1]).toBeCloseTo(2, 12);
    expect(fit.coefficients[2]).toBeCloseTo(-3, 12);
    expect(fit.residualSd).toBeLessThan(1e-12);
    expect(fit.r2).toBeCloseTo(1, 12);
  });
});

describe('"no spread" is decided relative to the data\'s size, not by an exact zero', () => {
  // The mean of three copies of 0.35 is 0.34999999999999990 in binary floating point, so the centred
  // sums are roundoff (~1e-33), not zero; the fits must still refuse (by hand: a constant has no slope).
  it('fitLinear refuses a constant predictor that centres to roundoff: x = [0.35, 0.35, 0.35]', () => {
    expect(() => fitLinear([0.35, 0.35, 0.35], [0, 1, 2])).toThrow(expect.objectContaining({ code: 'no-variation', field: 'x' }));
  });

  it('fitLinear refuses a constant response that centres to roundoff: y = [0.35, 0.35, 0.35]', () => {
    expect(() => fitLinear([0, 1, 2], [0.35, 0.35, 0.35])).toThrow(expect.objectContaining({ code: 'no-variation', field: 'y' }));
  });

  it.each([6.35, 12.7, 25.4, 50.8])('fitMultiple refuses a first column of constant thickness %d mm (its own-norm rank test could never fire)', (thickness) => {
    // n where the mean of n equal values is not the value itself (the mean rounds by one ulp).
    for (const n of [6, 12, 24, 41, 96]) {
      const rows = Array.from({ length: n }, (_, i) => [thickness, 0.3 + 0.01 * i]);
      const y = rows.map(([, g], i) => 180 - 150 * (g as number) + (i % 3));
      expect(() => fitMultiple(rows, y)).toThrow(expect.objectContaining({ code: 'rank-deficient', field: 'rows' }));
    }
  });

  it('fitMultiple refuses a constant thickness in the second column too, and a constant y', () => {
    const rows = Array.from({ length: 12 }, (_, i) => [0.3 + 0.01 * i, 12.7]);
    expect(() =>
      fitMultiple(
        rows,
        rows.map((_, i) => i),
      ),
    ).toThrow(expect.objectContaining({ code: 'rank-deficient' }));
    // Thicknesses one ulp apart (0.5 in converted two ways) are no spread either.
    const ulp = Array.from({ length: 12 }, (_, i) => [0.3 + 0.01 * i, i % 2 === 0 ? 12.7 : 12.700000000000001]);
    expect(() =>
      fitMultiple(
        ulp,
        ulp.map((_, i) => i),
      ),
    ).toThrow(expect.objectContaining({ code: 'rank-deficient' }));
    const ok = Array.from({ length: 12 }, (_, i) => [0.3 + 0.01 * i, 10 + (i % 4)]);
    expect(() =>
      fitMultiple(
        ok,
        ok.map(() => 0.35),
      ),
    ).toThrow(expect.objectContaining({ code: 'no-variation', field: 'y' }));
  });

  it('still fits a genuinely small spread: x = 10000000.1 … 10000000.3 (the scale of NIST StRD NumAcc4)', () => {
    const x = [10000000.1, 10000000.2, 10000000.3, 10000000.2];
    const fit = fitLinear(x, [1, 2, 3, 2.1]);
    expect(fit.slope).toBeGreaterThan(5);
    expect(
      fitMultiple(
        x.map((v) => [v]),
        [1, 2, 3, 2.1],
      ).coefficients[1],
    ).toBeCloseTo(fit.slope, 4);
  });
});
