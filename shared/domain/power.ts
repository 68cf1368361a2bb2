import jStat from 'jstat';
import { DomainError, requireFinite } from './errors';

/** jstat 1.9's noncentral t, which the module's declaration in jstat.d.ts does not list. */
const noncentralT = (jStat as unknown as { noncentralt: { cdf(x: number, dof: number, ncp: number): number } }).noncentralt;

/**
 * Power of a two-sided, two-sample Student t test with n coupons per group:
 * power = P(T' > t₁₋α/₂,ν) with T' noncentral t, ν = 2n − 2, noncentrality δ = Δ/(σ·√(2/n)).
 * This is the computation of R's `power.t.test` (type "two.sample", strict = FALSE), which likewise
 * ignores the far tail (negligible for any useful power). Noncentral t from jstat.
 * n may be fractional so that a sample size can be solved for continuously.
 */
export function twoSampleTPower(nPerGroup: number, difference: number, sd: number, alpha = 0.05): number {
  requireFinite(nPerGroup, 'nPerGroup');
  requireFinite(difference, 'difference');
  requireFinite(sd, 'sd');
  if (nPerGroup < 2) throw new DomainError('too-few-points', 'nPerGroup', 'nPerGroup must be at least 2');
  if (sd <= 0) throw new DomainError('non-positive-value', 'sd', 'sd must be greater than 0');
  if (!(alpha > 0 && alpha < 1)) throw new DomainError('non-positive-value', 'alpha', 'alpha must be between 0 and 1');
  const df = 2 * nPerGroup - 2;
  const ncp = (Math.abs(difference) / sd) * Math.sqrt(nPerGroup / 2);
  const tCrit = jStat.studentt.inv(1 - alpha / 2, df);
  return 1 - noncentralT.cdf(tCrit, df, ncp);
}

export interface SampleSize {
  /** Coupons per group, rounded up: what a plan needs. */
  nPerGroup: number;
  /** The fractional solution, as R's power.t.test prints it. */
  nExact: number;
  /** Power reached with nPerGroup coupons. */
  power: number;
}

/**
 * Coupons per group that a two-sided two-sample t test needs to detect a true difference `difference`
 * with the given power at level α, when the spread within a group is `sd` (same units as the difference).
 * Solves twoSampleTPower(n) = power by bisection, as R's power.t.test solves with uniroot.
 * Checked against R's power.t.test and Cohen (1988) Table 2.4.1 (both from memory).
 */
export function twoSampleSampleSize(difference: number, sd: number, power = 0.8, alpha = 0.05): SampleSize {
  requireFinite(difference, 'difference');
  requireFinite(sd, 'sd');
  if (difference === 0) throw new DomainError('non-positive-value', 'difference', 'difference must not be 0');
  if (sd <= 0) throw new DomainError('non-positive-value', 'sd', 'sd must be greater than 0');
  if (!(power > 0 && power < 1)) throw new DomainError('non-positive-value', 'power', 'power must be between 0 and 1');
  let lo = 2;
  let hi = 4;
  while (twoSampleTPower(hi, difference, sd, alpha) < power) {
    hi *= 2;
    if (hi > 1e9) throw new DomainError('too-few-points', 'difference', 'difference is too small against sd for any practical sample size');
  }
  if (twoSampleTPower(lo, difference, sd, alpha) >= power) return { nPerGroup: 2, nExact: 2, power: twoSampleTPower(2, difference, sd, alpha) };
  for (let i = 0; i < 100 && hi - lo > 1e-9 * hi; i++) {
    const mid = (lo + hi) / 2;
    if (twoSampleTPower(mid, difference, sd, alpha) < power) lo = mid;
    else hi = mid;
  }
  const nPerGroup = Math.ceil(hi - 1e-9);
  return { nPerGroup, nExact: hi, power: twoSampleTPower(nPerGroup, difference, sd, alpha) };
}
