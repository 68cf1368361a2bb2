import { DEFAULT_CELL_WALL_DENSITY, DomainError, fitLinear, fitMultipleColumns, maxWeightPercentGain } from '../domain/index';
import type { LinearFit } from '../domain/index';
import { DEFAULT_SG_COV, SG_WARNING_SDS, sgWarningText } from '../coupons/plausibility';
import type { Fit, Outlier, Overview } from '../schemas/analysis';
import type { CouponColumns } from './columns';
import { fitThroughOrigin, fmt, t975 } from './stats';

/**
 * Points are passed as parallel arrays (the coupons' positions in the columns, their x and their y) rather
 * than one object per point, so a hundred thousand coupons make three arrays, not a hundred thousand objects.
 */
export interface Points {
  cols: CouponColumns;
  /** Position in `cols` of the point's coupon. */
  at: readonly number[];
  x: number[];
  y: number[];
}

/** Beyond this many residual SDs (internally studentized) a coupon is listed as an outlier; common practice. */
export const RESIDUAL_OUTLIER_Z = 3;
const BAND_STEPS = 40;

const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`;

function direction(v: number, up: string, down: string): string {
  return v >= 0 ? up : down;
}

function ciText(lo: number, hi: number, scale: number, digits: number): string {
  const a = lo * scale;
  const b = hi * scale;
  return `95 % CI ${fmt(Math.min(a, b), digits)} to ${fmt(Math.max(a, b), digits)}`;
}

export interface SimpleFitResult {
  fit: Fit;
  linear: LinearFit;
  xMean: number;
  sxx: number;
}

/**
 * WPG against one predictor by the core's `fitLinear`, with the 95 % confidence band for the mean line:
 * ŷ(x) ± t₀.₉₇₅,ₙ₋₂ · s · √(1/n + (x − x̄)²/Sxx) (e.g. NIST/SEMATECH e-Handbook §4.5.2, section from memory).
 * `per` is the step the sentence speaks in (0.1 of SG, 1 mm). Null with a reason when no line can be fitted.
 */
export function simpleFit(model: 'density' | 'thickness', x: number[], y: number[]): SimpleFitResult | { note: string } {
  const what = model === 'density' ? 'oven-dry SG' : 'thickness';
  if (x.length < 3) return { note: `No WPG–${what} line: it needs at least 3 coupons, and ${x.length} have both values.` };
  let linear: LinearFit;
  try {
    linear = fitLinear(x, y);
  } catch (e) {
    if (e instanceof DomainError) return { note: `No WPG–${what} line: ${e.message}.` };
    throw e;
  }
  const n = linear.n;
  let sum = 0;
  for (let i = 0; i < n; i++) sum += x[i] as number;
  const xMean = sum / n;
  let sxx = 0;
  for (let i = 0; i < n; i++) sxx += ((x[i] as number) - xMean) ** 2;
  const t = t975(n - 2);
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of x) {
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  const band: Fit['band'] = [];
  for (let i = 0; i <= BAND_STEPS; i++) {
    const xi = lo + ((hi - lo) * i) / BAND_STEPS;
    const f = linear.intercept + linear.slope * xi;
    const half = t * linear.residualSd * Math.sqrt(1 / n + ((xi - xMean) * (xi - xMean)) / sxx);
    band.push({ x: xi, fit: f, lo: f - half, hi: f + half });
  }
  const ci = (est: number, se: number): [number, number] => [est - t * se, est + t * se];
  const slopeCi = ci(linear.slope, linear.slopeSe);
  const step = model === 'density' ? 0.1 : 1;
  const stepWords = model === 'density' ? 'each 0.1 rise in oven-dry SG' : 'each 1 mm of extra thickness';
  const change = linear.slope * step;
  const sentence =
    `Across ${plural(n, 'coupon')}, WPG ${direction(change, 'rises', 'falls')} by about ${fmt(Math.abs(change))} points for ${stepWords} ` +
    `(${ciText(slopeCi[0], slopeCi[1], step, 1)}); the line accounts for ${fmt(linear.r2 * 100, 0)} % of the spread (R² = ${fmt(linear.r2, 2)}) ` +
    `and coupons scatter about ±${fmt(linear.residualSd)} points around it (residual SD). The shaded band is the 95 % confidence band of the mean line.`;
  return {
    fit: {
      model,
      n,
      coefficients: [
        { name: 'intercept', estimate: linear.intercept, se: linear.interceptSe, ci95: ci(linear.intercept, linear.interceptSe) },
        { name: model === 'density' ? 'SG' : 'thickness (mm)', estimate: linear.slope, se: linear.slopeSe, ci95: slopeCi },
      ],
      r2: linear.r2,
      residualSd: linear.residualSd,
      sentence,
      band,
    },
    linear,
    xMean,
    sxx,
  };
}

/**
 * WPG on oven-dry SG and thickness together, by the core's `fitMultipleColumns` (fitMultiple's QR), with a plain reading at
 * equal thickness and at equal SG.
 */
export function multipleFit(sgs: readonly number[], thicknesses: readonly number[], y: number[]): Fit | { note: string } {
  if (y.length < 4) return { note: `No fit on SG and thickness together: it needs at least 4 coupons, and ${y.length} have all three values.` };
  let m;
  try {
    // Columns as they are: no array per coupon.
    m = fitMultipleColumns([sgs, thicknesses], y);
  } catch (e) {
    if (e instanceof DomainError) {
      const why = e.code === 'rank-deficient' ? 'SG or thickness does not vary independently (e.g. every coupon has the same thickness)' : e.message;
      return { note: `No fit on SG and thickness together: ${why}.` };
    }
    throw e;
  }
  const t = t975(m.n - 3);
  const names = ['intercept', 'SG', 'thickness (mm)'];
  const coefficients = m.coefficients.map((est, i) => {
    const se = m.standardErrors[i] as number;
    return { name: names[i] as string, estimate: est, se, ci95: [est - t * se, est + t * se] as [number, number] };
  });
  const sg = coefficients[1] as Fit['coefficients'][number];
  const th = coefficients[2] as Fit['coefficients'][number];
  const sentence =
    `At equal thickness, each 0.1 of SG ${direction(sg.estimate, 'raises', 'lowers')} uptake by about ${fmt(Math.abs(sg.estimate * 0.1))} points ` +
    `(${ciText(sg.ci95[0], sg.ci95[1], 0.1, 1)}); at equal SG, each 1 mm of thickness ${direction(th.estimate, 'raises', 'lowers')} it by about ` +
    `${fmt(Math.abs(th.estimate), 2)} points (${ciText(th.ci95[0], th.ci95[1], 1, 2)}). Together they account for ${fmt(m.r2 * 100, 0)} % of the spread ` +
    `(R² = ${fmt(m.r2, 2)}, residual SD ${fmt(m.residualSd)} points, ${plural(m.n, 'coupon')}).`;
  return { model: 'density+thickness', n: m.n, coefficients, r2: m.r2, residualSd: m.residualSd, sentence, band: [] };
}

/**
 * Outliers: an internally studentized residual r/(s·√(1 − h)), h = 1/n + (x − x̄)²/Sxx, beyond
 * RESIDUAL_OUTLIER_Z on the WPG–SG line; and a measured SG beyond SG_WARNING_SDS species SDs from the
 * species reference (the same rule the entry grid flags with).
 */
export function findOutliers(pts: Points, fit: SimpleFitResult | null): Outlier[] {
  const out: Outlier[] = [];
  const { cols } = pts;
  if (fit) {
    const { linear, xMean, sxx } = fit;
    const n = linear.n;
    for (let i = 0; i < pts.x.length; i++) {
      const x = pts.x[i] as number;
      const y = pts.y[i] as number;
      const expected = linear.intercept + linear.slope * x;
      const h = 1 / n + ((x - xMean) * (x - xMean)) / sxx;
      const z = (y - expected) / (linear.residualSd * Math.sqrt(Math.max(1 - h, 1e-12)));
      if (Math.abs(z) > RESIDUAL_OUTLIER_Z) {
        const c = cols.coupon(pts.at[i] as number);
        out.push({
          id: c.id,
          tag: c.tag,
          kind: 'residual',
          value: z,
          reason: `WPG ${fmt(y)} % where the line expects ${fmt(expected)} % at SG ${x.toFixed(3)}: a standardized residual of ${fmt(z)}.`,
        });
      }
    }
  }
  // Every coupon of the set (controls and excluded ones too) against its species' reference.
  for (let i = 0; i < cols.n; i++) {
    const drySg = cols.drySg[i] as number;
    const referenceSg = cols.referenceSg[i] as number;
    if (drySg !== drySg || referenceSg !== referenceSg) continue;
    const given = cols.referenceSgCov[i] as number;
    const cov = given === given ? given : DEFAULT_SG_COV;
    const z = (drySg - referenceSg) / (cov * referenceSg);
    if (Math.abs(z) > SG_WARNING_SDS) {
      const c = cols.coupon(i);
      out.push({
        id: c.id,
        tag: c.tag,
        kind: 'sg',
        value: z,
        reason: sgWarningText(drySg, { referenceSg, coefficientOfVariation: cov, z, plausible: false }),
      });
    }
  }
  return out;
}

/**
 * The theoretical-maximum curve WPG_max(SG) of the core's `maxWeightPercentGain` for each resin among the
 * points, over their SG range, with the fraction of voids filled the data imply: least squares through
 * the origin of actual WPG on each coupon's WPG_max at the plotted SG.
 */
export function theoreticalMax(pts: Points): Overview['theoreticalMax'] {
  // Grouped by resin name and density (two resins of one name and density draw one curve), in order of
  // first appearance. A resin id always has the same name and density, so each id is looked up once.
  type Entry = { name: string; density: number; at: number[] };
  const byResin = new Map<string, Map<number, Entry>>();
  const byId = new Map<number, Entry | null>();
  const order: Entry[] = [];
  const { cols } = pts;
  for (let i = 0; i < pts.at.length; i++) {
    const p = pts.at[i] as number;
    const resinId = cols.resinId[p] as number;
    let e = byId.get(resinId);
    if (e === undefined) {
      const c = cols.coupon(p);
      const d = c.resinDensityGcm3;
      if (d === null || c.resinName === null) e = null;
      else {
        let byDensity = byResin.get(c.resinName);
        if (!byDensity) byResin.set(c.resinName, (byDensity = new Map()));
        e = byDensity.get(d) ?? null;
        if (!e) {
          e = { name: c.resinName, density: d, at: [] };
          byDensity.set(d, e);
          order.push(e);
        }
      }
      byId.set(resinId, e);
    }
    if (e) e.at.push(i);
  }
  const out: Overview['theoreticalMax'] = [];
  for (const { name, density, at } of order) {
    let lo = Infinity;
    let hi = -Infinity;
    for (const i of at) {
      const x = pts.x[i] as number;
      if (x < lo) lo = x;
      if (x > hi) hi = x;
    }
    lo = Math.max(0.05, lo - 0.05);
    hi = Math.min(DEFAULT_CELL_WALL_DENSITY - 0.05, hi + 0.05);
    const curve: { x: number; y: number }[] = [];
    for (let i = 0; i <= BAND_STEPS; i++) {
      const x = lo + ((hi - lo) * i) / BAND_STEPS;
      curve.push({ x, y: maxWeightPercentGain(x, density) });
    }
    const mx: number[] = [];
    const my: number[] = [];
    for (const i of at) {
      const x = pts.x[i] as number;
      if (x <= 0 || x >= DEFAULT_CELL_WALL_DENSITY) continue;
      mx.push(maxWeightPercentGain(x, density));
      my.push(pts.y[i] as number);
    }
    let impliedFill: Overview['theoreticalMax'][number]['impliedFill'] = null;
    if (mx.length >= 2) {
      const f = fitThroughOrigin(mx, my);
      impliedFill = { fraction: f.slope, ci95: f.ci95, n: f.n };
    }
    out.push({ resinName: name, resinDensityGcm3: density, cellWallDensityGcm3: DEFAULT_CELL_WALL_DENSITY, curve, impliedFill });
  }
  return out;
}
