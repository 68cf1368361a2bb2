import { Matrix, QrDecomposition } from 'ml-matrix';
import { mean } from 'simple-statistics';
import { DomainError, requireFinite, requireFiniteArray } from './errors';

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
 * NIST StRD Norris to 12 or more significant digits. Needs 3 points and some spread in x and y.
 */
export function fitLinear(x: readonly number[], y: readonly number[]): LinearFit {
  requireFiniteArray(x, 'x', 3);
  requireFiniteArray(y, 'y', 0);
  if (y.length !== x.length) {
    throw new DomainError('length-mismatch', 'y', `y has ${y.length} values but x has ${x.length}`);
  }
  const n = x.length;
  const mx = mean(x as number[]);
  const my = mean(y as number[]);
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    const dx = (x[i] as number) - mx;
    const dy = (y[i] as number) - my;
    sxx += dx * dx;
    sxy += dx * dy;
    syy += dy * dy;
  }
  if (sxx === 0) throw new DomainError('no-variation', 'x', 'all x values are equal, so no slope can be fitted');
  if (syy === 0) throw new DomainError('no-variation', 'y', 'all y values are equal, so R² is undefined');
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

/** A column is treated as a linear combination of the earlier ones below this share of its own length. */
const RANK_TOLERANCE = 1e-10;

/**
 * Multiple least squares y = b₀ + Σ bⱼxⱼ by Householder QR (ml-matrix) of the column-centered design,
 * not by the normal equations: XᵀX squares the condition number, and on NIST StRD Longley the normal
 * equations keep no correct digit while QR keeps 12 or more. With X_c = QR:
 * b = R⁻¹Qᵀ(y − ȳ), b₀ = ȳ − x̄ᵀb, s² = SSE/(n − p − 1), Cov(b) = s²R⁻¹R⁻ᵀ,
 * Var(b₀) = s²(1/n + ‖R⁻ᵀx̄‖²) (centered columns are orthogonal to the intercept), R² = 1 − SSE/SST.
 * Golub & Van Loan, Matrix Computations, ch. 5 (from memory). Needs n ≥ p + 2 rows.
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
  rows.forEach((row, i) => {
    if (!Array.isArray(row) || row.length !== p) {
      throw new DomainError('length-mismatch', 'rows', `row ${i} has ${row?.length ?? 0} values, expected ${p}`, i);
    }
    row.forEach((v) => requireFinite(v, 'rows', i));
  });
  requireFiniteArray(y, 'y', 0);
  if (y.length !== n) throw new DomainError('length-mismatch', 'y', `y has ${y.length} values but rows has ${n}`);

  const xMeans: number[] = [];
  for (let j = 0; j < p; j++) xMeans.push(mean(rows.map((row) => row[j] as number)));
  const yMean = mean(y as number[]);

  const centered = new Matrix(n, p);
  const yc = new Matrix(n, 1);
  let sst = 0;
  for (let i = 0; i < n; i++) {
    const row = rows[i] as readonly number[];
    for (let j = 0; j < p; j++) centered.set(i, j, (row[j] as number) - (xMeans[j] as number));
    const d = (y[i] as number) - yMean;
    yc.set(i, 0, d);
    sst += d * d;
  }
  if (sst === 0) throw new DomainError('no-variation', 'y', 'all y values are equal, so R² is undefined');

  const columnNorms = Array.from({ length: p }, (_, j) => centered.getColumnVector(j).norm());
  const qr = new QrDecomposition(centered);
  const r = qr.upperTriangularMatrix;
  for (let j = 0; j < p; j++) {
    if (Math.abs(r.get(j, j)) <= RANK_TOLERANCE * (columnNorms[j] as number)) {
      throw new DomainError(
        'rank-deficient',
        'rows',
        `predictor ${j + 1} is constant or a linear combination of the others`,
      );
    }
  }
  const b = qr.solve(yc).getColumn(0);

  let sse = 0;
  for (let i = 0; i < n; i++) {
    let fitted = 0;
    for (let j = 0; j < p; j++) fitted += centered.get(i, j) * (b[j] as number);
    const res = yc.get(i, 0) - fitted;
    sse += res * res;
  }
  const dfResidual = n - p - 1;
  const residualSd = Math.sqrt(sse / dfResidual);

  const rInv = upperTriangularInverse(r, p);
  const slopeSes = rInv.map((row) => residualSd * Math.sqrt(row.reduce((s, v) => s + v * v, 0)));
  // w = R⁻ᵀx̄, i.e. w_k = Σ_j R⁻¹[j][k]·x̄_j.
  let wNorm2 = 0;
  for (let k = 0; k < p; k++) {
    let w = 0;
    for (let j = 0; j <= k; j++) w += (rInv[j]?.[k] as number) * (xMeans[j] as number);
    wNorm2 += w * w;
  }
  const intercept = yMean - b.reduce((s, bj, j) => s + bj * (xMeans[j] as number), 0);
  return {
    coefficients: [intercept, ...b],
    standardErrors: [residualSd * Math.sqrt(1 / n + wNorm2), ...slopeSes],
    r2: 1 - sse / sst,
    residualSd,
    n,
  };
}

/** Inverse of the p×p upper-triangular R by back substitution, column by column, as nested arrays. */
function upperTriangularInverse(r: Matrix, p: number): number[][] {
  const inv = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  for (let col = 0; col < p; col++) {
    for (let i = col; i >= 0; i--) {
      let s = i === col ? 1 : 0;
      for (let k = i + 1; k <= col; k++) s -= r.get(i, k) * (inv[k]?.[col] as number);
      (inv[i] as number[])[col] = s / r.get(i, i);
    }
  }
  return inv;
}
