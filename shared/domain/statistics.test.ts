import jStat from 'jstat';
import { sampleStandardDeviation, tTestTwoSample } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { readNistData } from '../../tests/reference/read-reference';
import { HEDGES_G_NOTE, hasSpread, summarize, welchTest } from './index';

/** NIST's log relative error: the number of correct significant digits. */
const lre = (computed: number, certified: number) => (computed === certified ? Infinity : -Math.log10(Math.abs(computed - certified) / Math.abs(certified)));

describe('summarize against NIST StRD univariate certified values', () => {
  // [dataset file, certified mean, certified SD (n − 1), min digits required, source]
  const rows: [string, number, number, number, string][] = [
    ['Michelso.dat', 299.8524, 0.0790105478190518, 12, 'NIST StRD Michelso (lower difficulty; Dorsey 1944 Table 22)'],
    ['NumAcc4.dat', 10000000.2, 0.1, 8, 'NIST StRD NumAcc4 (higher difficulty; Simon & Lesage 1989)'],
  ];
  it.each(rows)('%s: mean and SD to the required digits  (%s)', (file, mean, sd, digits) => {
    const values = readNistData(`./nist-strd/${file}`).map((r) => r[0] as number);
    const s = summarize(values);
    expect(lre(s.mean, mean)).toBeGreaterThanOrEqual(digits + 3);
    expect(lre(s.sd, sd)).toBeGreaterThanOrEqual(digits);
    expect(s.se).toBeCloseTo(s.sd / Math.sqrt(values.length), 15);
  });

  it('matches a second library (jstat mean, sample SD, median) on Michelso', () => {
    const values = readNistData('./nist-strd/Michelso.dat').map((r) => r[0] as number);
    const s = summarize(values);
    expect(lre(s.mean, jStat.mean(values))).toBeGreaterThanOrEqual(13);
    expect(lre(s.sd, jStat.stdev(values, true))).toBeGreaterThanOrEqual(10);
    expect(s.median).toBe(jStat.median(values));
    expect([s.n, s.min, s.max]).toEqual([100, 299.62, 300.07]);
  });
});

describe('summarize: Student t interval', () => {
  // Two-sided 95 % t quantiles. df 1 and 2 have closed forms: t = tan(π(p − ½)) and t = (2p − 1)/√(2p(1 − p)).
  // Larger df: NIST/SEMATECH e-Handbook §1.3.6.7.2 table of t critical values (3 decimals; values from memory).
  // [n, t₀.₉₇₅,ₙ₋₁, tolerance, source]
  const rows: [number, number, number, string][] = [
    [2, Math.tan(Math.PI * 0.475), 1e-7, 'closed form, df 1 (Cauchy)'],
    [3, 0.95 / Math.sqrt(2 * 0.975 * 0.025), 1e-7, 'closed form, df 2'],
    [11, 2.228, 5e-4, 'NIST/SEMATECH e-Handbook t table, df 10 (from memory)'],
    [31, 2.042, 5e-4, 'NIST/SEMATECH e-Handbook t table, df 30 (from memory)'],
    [101, 1.984, 5e-4, 'NIST/SEMATECH e-Handbook t table, df 100 (from memory)'],
  ];
  it.each(rows)('n = %d: half-width is t = %d times SE (±%d)  (%s)', (n, t, tol) => {
    // Values 1…n: mean (n + 1)/2, SD √(n(n + 1)/12), by hand.
    const values = Array.from({ length: n }, (_, i) => i + 1);
    const s = summarize(values);
    expect(s.mean).toBeCloseTo((n + 1) / 2, 12);
    expect(s.sd).toBeCloseTo(Math.sqrt((n * (n + 1)) / 12), 12);
    const half = (s.ci95[1] - s.ci95[0]) / 2;
    expect(Math.abs(half / s.se - t)).toBeLessThanOrEqual(tol);
  });

  it('textbook sample [2, 4, 4, 4, 5, 5, 7, 9]: mean 5, SD √(32/7), median 4.5 (by hand)', () => {
    const s = summarize([2, 4, 4, 4, 5, 5, 7, 9]);
    expect(s.mean).toBe(5);
    expect(s.sd).toBeCloseTo(Math.sqrt(32 / 7), 14);
    expect(s.sd).toBeCloseTo(sampleStandardDeviation([2, 4, 4, 4, 5, 5, 7, 9]), 14);
    expect(s.median).toBe(4.5);
  });
});

describe("welchTest on Student's sleep data", () => {
  // Cushny & Peebles (1905) J. Physiol. 32:501–510, as tabulated by Student (1908) Biometrika 6(1):1–25:
  // extra hours of sleep under two drugs. Reference results: R stats::t.test (Welch), as printed in the
  // documentation example of the R package afex, compare.2.vectors: t = −1.860813, df = 17.77647,
  // p = 0.07939414 (pooled-variance p = 0.07918671). CI −3.3654832 … 0.2054832 from R output (from memory).
  const drug1 = [0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0];
  const drug2 = [1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4];
  const w = welchTest(drug1, drug2);

  it('reproduces R: t, df, p to the printed digits', () => {
    expect(Math.abs(w.t - -1.860813)).toBeLessThanOrEqual(5e-7);
    expect(Math.abs(w.df - 17.77647)).toBeLessThanOrEqual(5e-6);
    expect(Math.abs(w.p - 0.07939414)).toBeLessThanOrEqual(5e-9);
    expect(w.meanDiff).toBeCloseTo(0.75 - 2.33, 14);
    expect(Math.abs(w.ci95[0] - -3.3654832)).toBeLessThanOrEqual(5e-7);
    expect(Math.abs(w.ci95[1] - 0.2054832)).toBeLessThanOrEqual(5e-7);
  });

  it('agrees with the hand formulas (Welch 1947) and with a second library', () => {
    const m1 = 0.75;
    const m2 = 2.33;
    const v1 = drug1.reduce((s, x) => s + (x - m1) ** 2, 0) / 9;
    const v2 = drug2.reduce((s, x) => s + (x - m2) ** 2, 0) / 9;
    const se2 = v1 / 10 + v2 / 10;
    expect(w.t).toBeCloseTo((m1 - m2) / Math.sqrt(se2), 12);
    expect(w.df).toBeCloseTo(se2 ** 2 / ((v1 / 10) ** 2 / 9 + (v2 / 10) ** 2 / 9), 10);
    // With equal group sizes Welch's t equals the pooled t, which simple-statistics computes.
    expect(w.t).toBeCloseTo(tTestTwoSample(drug1, drug2, 0) as number, 12);
    // p from jstat's t CDF, a different code path from the incomplete beta used inside welchTest. jstat's
    // continued fraction stops at a relative step of 3e-7, so the two agree to about 7 digits, not 15.
    expect(lre(w.p, 2 * jStat.studentt.cdf(-Math.abs(w.t), w.df))).toBeGreaterThanOrEqual(7);
    // Hedges' g with J = 1 − 3/(4(n1 + n2) − 9) on the pooled SD (Hedges 1981).
    const pooled = Math.sqrt((9 * v1 + 9 * v2) / 18);
    expect(w.hedgesG).toBeCloseTo((1 - 3 / 71) * ((m1 - m2) / pooled), 12);
  });

  it('is antisymmetric in its groups and gives p = 1 for equal means', () => {
    const r = welchTest(drug2, drug1);
    expect(r.t).toBeCloseTo(-w.t, 14);
    expect(r.p).toBeCloseTo(w.p, 14);
    expect(r.hedgesG).toBeCloseTo(-w.hedgesG, 14);
    expect(welchTest([1, 2, 3], [0, 2, 4]).p).toBe(1);
  });
});

describe('the incomplete beta from jstat that welchTest uses for p, verified where closed forms exist', () => {
  // Two-sided p = I_{df/(df+t²)}(df/2, ½). Closed forms: df 1 p = 1 − 2·atan(t)/π; df 2 p = 1 − t/√(2 + t²).
  it.each([0.5, 1, 2, 5, 10, 40])('two-sided p at t = %d, df 1 and 2, to 7 digits', (t) => {
    const p1 = 1 - (2 * Math.atan(t)) / Math.PI;
    const p2 = 1 - t / Math.sqrt(2 + t * t);
    expect(lre(jStat.ibeta(1 / (1 + t * t), 0.5, 0.5), p1)).toBeGreaterThanOrEqual(7);
    expect(lre(jStat.ibeta(2 / (2 + t * t), 1, 0.5), p2)).toBeGreaterThanOrEqual(7);
  });
});

describe('welchTest: "no spread" relative to the data\'s size', () => {
  it('refuses two constant groups whose variances are roundoff: [0.3, 0.3, 0.3] vs [0.35, 0.35, 0.35]', () => {
    // By hand: both groups are constant, so the t statistic is 0/0; the old exact-zero test gave t = −1.27e15.
    expect(() => welchTest([0.3, 0.3, 0.3], [0.35, 0.35, 0.35])).toThrow(expect.objectContaining({ code: 'no-variation' }));
  });

  it('treats a roundoff-only variance as exactly zero when the other group has spread', () => {
    // With s_a² = 0 Welch reduces to the one-sample t of b against mean(a): t = (x̄_a − x̄_b)/(s_b/√n_b),
    // df = n_b − 1 (by hand from the formulas).
    const a = [0.35, 0.35, 0.35];
    const b = [0.3, 0.4, 0.5, 0.6];
    const w = welchTest(a, b);
    const sb = Math.sqrt(((0.3 - 0.45) ** 2 + (0.4 - 0.45) ** 2 + (0.5 - 0.45) ** 2 + (0.6 - 0.45) ** 2) / 3);
    expect(w.t).toBeCloseTo((0.35 - 0.45) / (sb / 2), 12);
    expect(w.df).toBe(3);
  });
});

describe("welchTest names what its Hedges' g is (correction and standardizer)", () => {
  it('returns J and the pooled SD it used, and g = J·(x̄_a − x̄_b)/s_pooled (Hedges 1981), on the sleep data', () => {
    const drug1 = [0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0];
    const drug2 = [1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4];
    const w = welchTest(drug1, drug2);
    expect(w.hedgesCorrection).toBeCloseTo(1 - 3 / 71, 15);
    const v1 = drug1.reduce((s, x) => s + (x - 0.75) ** 2, 0) / 9;
    const v2 = drug2.reduce((s, x) => s + (x - 2.33) ** 2, 0) / 9;
    expect(w.pooledSd).toBeCloseTo(Math.sqrt((v1 + v2) / 2), 13);
    expect(w.hedgesG).toBeCloseTo((w.hedgesCorrection * w.meanDiff) / w.pooledSd, 14);
    expect(HEDGES_G_NOTE).toMatch(/pooled standard deviation/);
    expect(HEDGES_G_NOTE).toMatch(/J = 1 − 3\/\(4\(n₁ \+ n₂\) − 9\)/);
  });
});

describe('hasSpread: the shared "no spread" rule (relative to the values\' size)', () => {
  // [values, expected, why]
  const rows: [number[], boolean, string][] = [
    [[0.35, 0.35, 0.35], false, 'equal values whose mean rounds by one ulp'],
    [[12.7, 12.700000000000001, 12.7, 12.7], false, 'one ulp apart, as a unit conversion can leave them'],
    [[0, 0, 0], false, 'all zero'],
    [[10000000.1, 10000000.3], true, 'a spread of 1e-8 of the size (NIST StRD NumAcc4 scale)'],
    [[1e-30, 2e-30], true, 'tiny values with a real relative spread'],
    [[5], false, 'a single value'],
  ];
  it.each(rows)('%j → %s (%s)', (values, expected) => {
    expect(hasSpread(values)).toBe(expected);
  });
});
