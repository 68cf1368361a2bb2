import jStat from 'jstat';
import { max, mean, median, min, sampleVariance } from 'simple-statistics';
import { DomainError, requireFiniteArray } from './errors';
import { isNegligibleSpread, spreadSums } from './spread';

/**
 * Two-sided 95 % quantile of Student's t with df degrees of freedom (df may be fractional), from jstat.
 * About 8 significant digits: jstat's incomplete beta stops at a relative step of 3e-7.
 */
function t975(df: number): number {
  return jStat.studentt.inv(0.975, df);
}

/**
 * Two-sided p value of Student's t: p = I_{df/(df+t²)}(df/2, 1/2), jstat's incomplete beta. This form
 * keeps its relative accuracy far into the tail (t = 10⁴, df 10: 14 digits, where 2·cdf(−|t|) gives 9);
 * in the usual range both give 7–10 digits.
 * The t–beta relation is the standard one, e.g. Abramowitz & Stegun (1964) ch. 26 (from memory).
 */
function twoSidedP(t: number, df: number): number {
  return jStat.ibeta(df / (df + t * t), df / 2, 0.5);
}

export interface Summary {
  n: number;
  mean: number;
  /** Sample standard deviation (n − 1 denominator). */
  sd: number;
  /** Standard error of the mean, sd/√n. */
  se: number;
  /** 95 % confidence interval of the mean, Student t with n − 1 df. */
  ci95: [number, number];
  median: number;
  min: number;
  max: number;
}

/**
 * Group statistics: mean, sample SD (two-pass, n − 1), SE = SD/√n, 95 % CI = mean ± t₀.₉₇₅,ₙ₋₁·SE,
 * median, min, max. NIST/SEMATECH e-Handbook of Statistical Methods, "Confidence limits for the mean"
 * (§1.3.5.2, section number from memory). Needs at least 2 values, since one value has no spread.
 */
export function summarize(values: readonly number[]): Summary {
  requireFiniteArray(values, 'values', 2);
  const xs = values as number[]; // simple-statistics types want a mutable array; it does not mutate.
  const n = xs.length;
  const m = mean(xs);
  const sd = Math.sqrt(sampleVariance(xs));
  const se = sd / Math.sqrt(n);
  const half = t975(n - 1) * se;
  return { n, mean: m, sd, se, ci95: [m - half, m + half], median: median(xs), min: min(xs), max: max(xs) };
}

export interface WelchResult {
  t: number;
  /** Welch–Satterthwaite degrees of freedom (fractional). */
  df: number;
  /** Two-sided p value. */
  p: number;
  /** mean(a) − mean(b). */
  meanDiff: number;
  /** 95 % confidence interval of mean(a) − mean(b). */
  ci95: [number, number];
  /**
   * Hedges' g: (mean(a) − mean(b)) / pooled SD, times the small-sample correction J (see HEDGES_G_NOTE).
   * Without J it would be Cohen's d with the pooled SD.
   */
  hedgesG: number;
  /** The small-sample correction J = 1 − 3/(4(n_a + n_b) − 9) that hedgesG includes. */
  hedgesCorrection: number;
  /** The standardizer of hedgesG: √[((n_a − 1)s_a² + (n_b − 1)s_b²)/(n_a + n_b − 2)], in the units of the data. */
  pooledSd: number;
}

/** What Hedges' g is, in words to show beside it wherever it is shown. */
export const HEDGES_G_NOTE =
  "Hedges' g: the difference of the means divided by the pooled standard deviation of both groups, " +
  'times the small-sample correction J = 1 − 3/(4(n₁ + n₂) − 9).';

/**
 * Welch's unequal-variance t test, two-sided: t = (x̄_a − x̄_b)/√(s_a²/n_a + s_b²/n_b),
 * df = (s_a²/n_a + s_b²/n_b)² / [(s_a²/n_a)²/(n_a − 1) + (s_b²/n_b)²/(n_b − 1)];
 * Welch (1947) Biometrika 34:28–35. Effect size Hedges' g = J·(x̄_a − x̄_b)/s_pooled,
 * J = 1 − 3/(4(n_a + n_b) − 9); Hedges (1981) J. Educational Statistics 6(2):107–128. Both citations'
 * volume and pages are from memory.
 * Each group needs 2 values. A group whose spread is roundoff against its size (spread.ts) counts as
 * exactly no spread; two such groups leave t undefined and are refused.
 */
export function welchTest(a: readonly number[], b: readonly number[]): WelchResult {
  requireFiniteArray(a, 'a', 2);
  requireFiniteArray(b, 'b', 2);
  const xa = a as number[];
  const xb = b as number[];
  const na = xa.length;
  const nb = xb.length;
  const sa = spreadSums(xa);
  const sb = spreadSums(xb);
  const va = isNegligibleSpread(sa.centredSumSq, sa.rawSumSq) ? 0 : sampleVariance(xa);
  const vb = isNegligibleSpread(sb.centredSumSq, sb.rawSumSq) ? 0 : sampleVariance(xb);
  if (va === 0 && vb === 0) {
    throw new DomainError('no-variation', 'a', 'neither group has any spread (all values equal to within roundoff), so the t test is undefined');
  }
  const meanDiff = mean(xa) - mean(xb);
  const qa = va / na;
  const qb = vb / nb;
  const se = Math.sqrt(qa + qb);
  const t = meanDiff / se;
  const df = ((qa + qb) * (qa + qb)) / ((qa * qa) / (na - 1) + (qb * qb) / (nb - 1));
  const half = t975(df) * se;
  const pooledSd = Math.sqrt(((na - 1) * va + (nb - 1) * vb) / (na + nb - 2));
  const j = 1 - 3 / (4 * (na + nb) - 9);
  return {
    t,
    df,
    p: twoSidedP(t, df),
    meanDiff,
    ci95: [meanDiff - half, meanDiff + half],
    hedgesG: (j * meanDiff) / pooledSd,
    hedgesCorrection: j,
    pooledSd,
  };
}
