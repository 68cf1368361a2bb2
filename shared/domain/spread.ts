/**
 * "No spread" decided relative to the data's own size, so that roundoff cannot pass for variation.
 *
 * A column of equal values (every thickness 12.7 mm, every SG 0.35) does not always centre to exact
 * zeros in floating point: the mean of n copies of 0.35 is 0.34999999999999990, and values converted
 * from inches can differ in the last bit. Those differences are about one unit in the last place
 * (2.2·10⁻¹⁶ relative); a test against exact zero lets them through and a fit then divides by them.
 * So a set of values has no spread when the root-sum-square of its deviations from the mean is at most
 * NO_SPREAD_RELATIVE times the root-sum-square of the values themselves. The factor is six orders of
 * magnitude above the roundoff that centring and summing 10⁶ values can create, and two below the
 * finest relative spread a shop's instruments can resolve (0.001 g in 1 kg is 10⁻⁶; NIST StRD NumAcc4,
 * 10000000.1…10000000.3, is 10⁻⁸ and still counts as spread). Common practice in numerical linear
 * algebra (a rank tolerance relative to the column norm, Golub & Van Loan, Matrix Computations
 * ch. 5, from memory); the factor itself is our choice, see docs/decisions.
 */
export const NO_SPREAD_RELATIVE = 1e-10;

/** True when √(Σ(x − x̄)²) ≤ NO_SPREAD_RELATIVE · √(Σx²), both given as sums of squares. */
export function isNegligibleSpread(centredSumSq: number, rawSumSq: number): boolean {
  return Math.sqrt(centredSumSq) <= NO_SPREAD_RELATIVE * Math.sqrt(rawSumSq);
}

/**
 * Compensated (Neumaier) sum, so the mean of a long column is correct to the last bit or so;
 * Neumaier (1974) Z. Angew. Math. Mech. 54:39–51 (from memory).
 */
export function compensatedSum(values: ArrayLike<number>): number {
  let sum = 0;
  let c = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i] as number;
    const t = sum + v;
    c += Math.abs(sum) >= Math.abs(v) ? sum - t + v : v - t + sum;
    sum = t;
  }
  return sum + c;
}

/** Σ(x − x̄)² and Σx² of values, the two sums isNegligibleSpread compares. */
export function spreadSums(values: ArrayLike<number>): { mean: number; centredSumSq: number; rawSumSq: number } {
  const n = values.length;
  const mean = compensatedSum(values) / n;
  let centredSumSq = 0;
  let rawSumSq = 0;
  for (let i = 0; i < n; i++) {
    const v = values[i] as number;
    const d = v - mean;
    centredSumSq += d * d;
    rawSumSq += v * v;
  }
  return { mean, centredSumSq, rawSumSq };
}

/**
 * Whether the values vary by more than roundoff relative to their own size (see NO_SPREAD_RELATIVE).
 * fitLinear, fitMultiple and welchTest refuse input that fails this; callers can ask first.
 */
export function hasSpread(values: readonly number[]): boolean {
  if (values.length < 2) return false;
  const { centredSumSq, rawSumSq } = spreadSums(values);
  return !isNegligibleSpread(centredSumSq, rawSumSq);
}
