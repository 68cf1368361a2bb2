import jStat from 'jstat';
import { DomainError, summarize } from '../domain/index';
import type { SummaryStats } from '../schemas/analysis';

/** Two-sided 95 % quantile of Student's t (jstat), for intervals built here from the core's SEs. */
export function t975(df: number): number {
  return jStat.studentt.inv(0.975, df);
}

/**
 * n, mean, SD and 95 % CI of the mean through the domain core's `summarize`; one value gives its mean
 * with no spread or interval, none gives null.
 */
export function statsOf(values: readonly number[]): SummaryStats | null {
  if (values.length === 0) return null;
  if (values.length === 1) return { n: 1, mean: values[0] as number, sd: null, ci95: null };
  try {
    const s = summarize(values);
    return { n: s.n, mean: s.mean, sd: s.sd, ci95: s.ci95 };
  } catch (e) {
    if (e instanceof DomainError) return null;
    throw e;
  }
}

export interface ThroughOrigin {
  slope: number;
  se: number;
  ci95: [number, number];
  n: number;
}

/**
 * Least squares through the origin, y = b·x: b = Σxy/Σx², s² = Σ(y − bx)²/(n − 1), SE(b) = s/√Σx²,
 * 95 % CI b ± t₀.₉₇₅,ₙ₋₁·SE. Draper & Smith, Applied Regression Analysis, 3rd ed., "regression
 * through the origin" (section from memory); common practice. Used for the fraction of voids filled:
 * actual WPG against the theoretical maximum WPG. Needs 2 points and some x.
 */
export function fitThroughOrigin(x: readonly number[], y: readonly number[]): ThroughOrigin {
  if (x.length !== y.length) throw new DomainError('length-mismatch', 'y', `y has ${y.length} values but x has ${x.length}`);
  const n = x.length;
  if (n < 2) throw new DomainError('too-few-points', 'x', 'a fit through the origin needs at least 2 points');
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < n; i++) {
    const xi = x[i] as number;
    sxx += xi * xi;
    sxy += xi * (y[i] as number);
  }
  if (sxx === 0) throw new DomainError('no-variation', 'x', 'all x values are 0');
  const b = sxy / sxx;
  let sse = 0;
  for (let i = 0; i < n; i++) {
    const e = (y[i] as number) - b * (x[i] as number);
    sse += e * e;
  }
  const se = Math.sqrt(sse / (n - 1)) / Math.sqrt(sxx);
  const half = t975(n - 1) * se;
  return { slope: b, se, ci95: [b - half, b + half], n };
}

/** A number for a sentence: `digits` decimals, a true minus sign. */
export function fmt(v: number, digits = 1): string {
  const s = v.toFixed(digits);
  return s.startsWith('-') ? `−${s.slice(1)}` : s;
}

/** p value for a sentence: two significant digits, or "< 0.001". */
export function fmtP(p: number): string {
  if (p < 0.001) return '< 0.001';
  return `= ${Number(p.toPrecision(2))}`;
}
