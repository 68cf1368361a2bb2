import { DomainError, requireFinite, requireFiniteArray } from './errors';
import { NO_SPREAD_RELATIVE, compensatedSum, isNegligibleSpread } from './spread';

export interface LinearFit {
  intercept: number;
  slope: number;
  interceptSe: number;
  slopeSe: number;
  r2: number;
  /** Residual standard deviation √(SSE/(n − 2)), in the units of y. */
  residualSd: number;
  n: number;
}

export interface MultipleFit {
  /** [intercept, b1, b2, …] in the order of the columns of rows. */
  coefficients: number[];
  /** Standard errors in the same order as coefficients. */
  standardErrors: number[];
  r2: number;
  /** Residual standard deviation √(SSE/(n − p − 1)), in the units of y. */
  residualSd: number;
  n: number;
}

/**
 * Straight-line least squares y = b₀ + b₁x on centered sums (two-pass, so large offsets in x do not
 * cancel digits): b₁ = Σ(x − x̄)(y − ȳ)/Σ(x − x̄)², b₀ = ȳ − b₁x̄, s = √(SSE/(n − 2)),
 * SE(b₁) = s/√Sxx, SE(b₀) = s·√(1/n + x̄²/Sxx), R² = 1 − SSE/Syy. Reproduces the certified values of
 * NIST StRD Norris to 12 or more significant digits. Needs 3 points and some spread in x and y, judged
 * relative to their size (see spread.ts).
 */
export function fitLinear(x: readonly number[], y: readonly number[]): LinearFit {
  requireFiniteArray(x, 'x', 3);
  requireFiniteArray(y, 'y', 0);
  if (y.length !== x.length) {
    throw new DomainError('length-mismatch', 'y', `y has ${y.length} values but x has ${x.length}`);
  }
  const n = x.length;
  const mx = compensatedSum(x) / n;
  const my = compensatedSum(y) / n;
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  let xx = 0;
  let yy = 0;
  for (let i = 0; i < n; i++) {
    const xi = x[i] as number;
    const yi = y[i] as number;
    const dx = xi - mx;
    const dy = yi - my;
    sxx += dx * dx;
    sxy += dx * dy;
    syy += dy * dy;
    xx += xi * xi;
    yy += yi * yi;
  }
  // Relative to the data's size, so a constant column whose mean rounds by one ulp is still constant.
  if (isNegligibleSpread(sxx, xx)) {
    throw new DomainError('no-variation', 'x', 'all x values are equal (to within roundoff), so no slope can be fitted');
  }
  if (isNegligibleSpread(syy, yy)) {
    throw new DomainError('no-variation', 'y', 'all y values are equal (to within roundoff), so R² is undefined');
  }
  const slope = sxy / sxx;
  const intercept = my - slope * mx;
  // Residuals from the centered form: y − ŷ = (y − ȳ) − b₁(x − x̄), which avoids re-adding the offset.
  let sse = 0;
  for (let i = 0; i < n; i++) {
    const r = (y[i] as number) - my - slope * ((x[i] as number) - mx);
    sse += r * r;
  }
  const residualSd = Math.sqrt(sse / (n - 2));
  return {
    intercept,
    slope,
    interceptSe: residualSd * Math.sqrt(1 / n + (mx * mx) / sxx),
    slopeSe: residualSd / Math.sqrt(sxx),
    r2: 1 - sse / syy,
    residualSd,
    n,
  };
}

/**
 * Multiple least squares y = b₀ + Σ bⱼxⱼ by Householder QR of the column-centered design, not by the
 * normal equations: XᵀX squares the condition number, and on NIST StRD Longley the normal equations keep
 * no correct digit while QR keeps 12 or more. With X_c = QR:
 * b = R⁻¹Qᵀ(y − ȳ), b₀ = ȳ − x̄ᵀb, SSE = ‖(Qᵀ(y − ȳ))ₚ₊₁…ₙ‖², s² = SSE/(n − p − 1), Cov(b) = s²R⁻¹R⁻ᵀ,
 * Var(b₀) = s²(1/n + ‖R⁻ᵀx̄‖²) (centered columns are orthogonal to the intercept), R² = 1 − SSE/SST.
 * Golub & Van Loan, Matrix Computations, ch. 5 (from memory). Needs n ≥ p + 2 rows.
 *
 * The design lives in one packed column-major Float64Array with y − ȳ as its last column, so Qᵀy comes
 * out of the same reflections and the work is O(n·p²) time and O(n·p) memory, linear in the rows.
 * A column is refused as rank-deficient when its QR diagonal (what is left of it after the intercept and
 * the earlier columns are taken out) is negligible against the column's own size √Σx², the same "no
 * spread" rule as fitLinear and welchTest (NO_SPREAD_RELATIVE).
 */
export function fitMultiple(rows: readonly (readonly number[])[], y: readonly number[]): MultipleFit {
  if (!Array.isArray(rows) || rows.length === 0) {
    throw new DomainError('too-few-points', 'rows', 'rows must hold at least one row');
  }
  const p = rows[0]?.length ?? 0;
  if (p === 0) throw new DomainError('too-few-points', 'rows', 'each row needs at least one predictor');
  const n = rows.length;
  if (n < p + 2) {
    throw new DomainError('too-few-points', 'rows', `${p} predictors need at least ${p + 2} rows, got ${n}`);
  }
  requireFiniteArray(y, 'y', 0);
  if (y.length !== n) throw new DomainError('length-mismatch', 'y', `y has ${y.length} values but rows has ${n}`);

  // Pack the predictors column-major (validating as we go), then y as column p.
  const a = new Float64Array(n * (p + 1));
  for (let i = 0; i < n; i++) {
    const row = rows[i];
    if (!Array.isArray(row) || row.length !== p) {
      throw new DomainError('length-mismatch', 'rows', `row ${i} has ${row?.length ?? 0} values, expected ${p}`, i);
    }
    for (let j = 0; j < p; j++) a[j * n + i] = requireFinite(row[j] as number, 'rows', i);
    a[p * n + i] = y[i] as number;
  }
  return fitPacked(a, n, p);
}

/**
 * fitMultiple with the predictors given as columns (one array per predictor, each as long as y), the
 * shape a column-wise reader already holds: no array per row is built. Same arithmetic, same answer.
 */
export function fitMultipleColumns(columns: readonly ArrayLike<number>[], y: readonly number[]): MultipleFit {
  const p = columns.length;
  if (p === 0) throw new DomainError('too-few-points', 'rows', 'each row needs at least one predictor');
  requireFiniteArray(y, 'y', 0);
  const n = y.length;
  if (n === 0) throw new DomainError('too-few-points', 'rows', 'rows must hold at least one row');
  if (n < p + 2) {
    throw new DomainError('too-few-points', 'rows', `${p} predictors need at least ${p + 2} rows, got ${n}`);
  }
  const a = new Float64Array(n * (p + 1));
  for (let j = 0; j < p; j++) {
    const column = columns[j] as ArrayLike<number>;
    if (column.length !== n) throw new DomainError('length-mismatch', 'rows', `predictor ${j + 1} has ${column.length} values but y has ${n}`);
    for (let i = 0; i < n; i++) a[j * n + i] = requireFinite(column[i] as number, 'rows', i);
  }
  a.set(y, p * n);
  return fitPacked(a, n, p);
}

/** The QR fit of fitMultiple over the packed column-major design `a` (n rows, p predictors, then y). */
function fitPacked(a: Float64Array, n: number, p: number): MultipleFit {
  const cols = p + 1;
  // Centre every column on its compensated mean; keep Σx² of each raw column as its size.
  const means = new Float64Array(cols);
  const rawNorms = new Float64Array(cols);
  const centredSumSq = new Float64Array(cols);
  for (let j = 0; j < cols; j++) {
    const column = a.subarray(j * n, (j + 1) * n);
    const m = compensatedSum(column) / n;
    let raw = 0;
    let centred = 0;
    for (let i = 0; i < n; i++) {
      const v = column[i] as number;
      raw += v * v;
      const d = v - m;
      column[i] = d;
      centred += d * d;
    }
    means[j] = m;
    rawNorms[j] = Math.sqrt(raw);
    centredSumSq[j] = centred;
  }
  const sst = centredSumSq[p] as number;
  if (isNegligibleSpread(sst, (rawNorms[p] as number) ** 2)) {
    throw new DomainError('no-variation', 'y', 'all y values are equal (to within roundoff), so R² is undefined');
  }
  for (let j = 0; j < p; j++) {
    if (isNegligibleSpread(centredSumSq[j] as number, (rawNorms[j] as number) ** 2)) {
      throw new DomainError('rank-deficient', 'rows', `predictor ${j + 1} has no spread (every value is the same)`);
    }
  }

  // Householder QR in place: column k's reflection zeroes rows k+1…n−1 and is applied to columns k+1…p.
  const r = new Float64Array(p * p); // row-major upper triangle
  for (let k = 0; k < p; k++) {
    const base = k * n;
    let norm2 = 0;
    for (let i = k; i < n; i++) norm2 += (a[base + i] as number) ** 2;
    const norm = Math.sqrt(norm2);
    const akk = a[base + k] as number;
    const alpha = akk > 0 ? -norm : norm;
    if (Math.abs(alpha) <= NO_SPREAD_RELATIVE * (rawNorms[k] as number)) {
      throw new DomainError('rank-deficient', 'rows', `predictor ${k + 1} is constant or a linear combination of the others`);
    }
    // v = (akk − alpha, a[k+1…]); vᵀv = 2·norm·(norm + |akk|); H = I − 2vvᵀ/vᵀv.
    const v0 = akk - alpha;
    const vtv = 2 * norm * (norm + Math.abs(akk));
    a[base + k] = v0;
    for (let j = k + 1; j < cols; j++) {
      const cj = j * n;
      let s = 0;
      for (let i = k; i < n; i++) s += (a[base + i] as number) * (a[cj + i] as number);
      const f = (2 * s) / vtv;
      for (let i = k; i < n; i++) a[cj + i] = (a[cj + i] as number) - f * (a[base + i] as number);
    }
    r[k * p + k] = alpha;
    for (let j = k + 1; j < p; j++) r[k * p + j] = a[j * n + k] as number;
  }

  // Qᵀ(y − ȳ): its first p entries give b by back substitution, the rest are the residual components.
  const qty = a.subarray(p * n, (p + 1) * n);
  const b = new Array<number>(p).fill(0);
  for (let i = p - 1; i >= 0; i--) {
    let s = qty[i] as number;
    for (let k = i + 1; k < p; k++) s -= (r[i * p + k] as number) * (b[k] as number);
    b[i] = s / (r[i * p + i] as number);
  }
  let sse = 0;
  for (let i = p; i < n; i++) sse += (qty[i] as number) ** 2;
  const dfResidual = n - p - 1;
  const residualSd = Math.sqrt(sse / dfResidual);

  const rInv = upperTriangularInverse(r, p);
  const slopeSes = rInv.map((row) => residualSd * Math.sqrt(row.reduce((s, v) => s + v * v, 0)));
  // w = R⁻ᵀx̄, i.e. w_k = Σ_j R⁻¹[j][k]·x̄_j.
  let wNorm2 = 0;
  for (let k = 0; k < p; k++) {
    let w = 0;
    for (let j = 0; j <= k; j++) w += (rInv[j]?.[k] as number) * (means[j] as number);
    wNorm2 += w * w;
  }
  const yMean = means[p] as number;
  const intercept = yMean - b.reduce((s, bj, j) => s + bj * (means[j] as number), 0);
  return {
    coefficients: [intercept, ...b],
    standardErrors: [residualSd * Math.sqrt(1 / n + wNorm2), ...slopeSes],
    r2: 1 - sse / sst,
    residualSd,
    n,
  };
}

/** Inverse of the p×p upper-triangular R (row-major) by back substitution, column by column. */
function upperTriangularInverse(r: Float64Array, p: number): number[][] {
  const inv = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  for (let col = 0; col < p; col++) {
    for (let i = col; i >= 0; i--) {
      let s = i === col ? 1 : 0;
      for (let k = i + 1; k <= col; k++) s -= (r[i * p + k] as number) * (inv[k]?.[col] as number);
      (inv[i] as number[])[col] = s / (r[i * p + i] as number);
    }
  }
  return inv;
}
