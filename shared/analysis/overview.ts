import type { AnalysisCoupon, Overview, PlotPoint, PointSet, SgBasis } from '../schemas/analysis';
import { columnsOf, isColumns, SCALE_CODES, type CouponColumns } from './columns';
import { exclusionReasons, speciesResinGroups } from './groups';
import { findOutliers, multipleFit, simpleFit, theoreticalMax, type Points, type SimpleFitResult } from './fits';
import { MAX_PLOT_POINTS, thinPositions } from './thin';

const point = (c: AnalysisCoupon, x: number, y: number): PlotPoint => ({
  id: c.id,
  tag: c.tag,
  species: c.speciesName,
  resin: c.resinName ?? '—',
  x,
  y,
});

/**
 * The positions of a point set to draw (null: all of them), chosen once per set of coupons: the WPG–SG
 * plot and the residual plot show the same coupons, so they share one sample. Thinning groups are
 * species × resin as a number (ids are small positive integers), so no string per coupon.
 */
function drawn(cols: CouponColumns, at: readonly number[], max: number, keep: ReadonlySet<number>): number[] | null {
  const n = at.length;
  if (n <= max) return null;
  const ids = new Float64Array(n);
  const groups = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const p = at[i] as number;
    ids[i] = cols.id[p] as number;
    const resin = cols.resinId[p] as number;
    groups[i] = (cols.speciesId[p] as number) * 1e7 + (resin === resin ? resin : 0);
  }
  return thinPositions(ids, groups, max, keep);
}

/** Plot points for the drawn positions only (all when `drawnAt` is null). */
function pointSet(pts: Points, drawnAt: number[] | null, xy: (i: number) => [number, number] = (i) => [pts.x[i] as number, pts.y[i] as number]): PointSet {
  const total = pts.at.length;
  const toPoint = (i: number) => point(pts.cols.coupon(pts.at[i] as number), ...xy(i));
  if (drawnAt === null) return { points: pts.at.map((_p, i) => toPoint(i)), total, shown: total, method: 'all' };
  const points = drawnAt.map(toPoint);
  return { points, total, shown: points.length, method: 'thinned' };
}

/** A plain sample of positions for the plots without a fit (every k-th item), kept as before. */
function every(at: number[], max: number): number[] {
  if (at.length <= max) return at;
  const k = Math.ceil(at.length / max);
  const out: number[] = [];
  for (let j = 0; j < at.length; j += k) out.push(at[j] as number);
  return out;
}

/**
 * Everything the Compare screen shows for one set of filtered coupons: who is included and who is
 * excluded (with reasons), the species × resin table, the three fits, the theoretical maximum, outliers
 * and the plot data (thinned above `maxPoints`). Takes the coupons or their columns (columns.ts).
 */
export function buildOverview(rows: readonly AnalysisCoupon[] | CouponColumns, sgBasis: SgBasis, maxPoints = MAX_PLOT_POINTS): Overview {
  return overviewOf(isColumns(rows) ? rows : columnsOf(rows), sgBasis, maxPoints);
}

/**
 * The overview over columns: one pass gathers the numbers each fit, test and table needs into plain
 * number arrays and positions, the arithmetic runs over those, and an object is built only for what is
 * shown — a drawn point, an excluded coupon, an outlier — never one per coupon.
 */
function overviewOf(cols: CouponColumns, sgBasis: SgBasis, maxPoints: number): Overview {
  const { n } = cols;
  const sgCol = sgBasis === 'measured' ? cols.drySg : cols.referenceSg;
  const included: number[] = [];
  const controls: number[] = [];
  const excluded: Overview['excluded'] = [];
  const sgX: number[] = [];
  const wpgY: number[] = [];
  // The subset with a thickness, for the thickness fits.
  const thickAt: number[] = [];
  const thickX: number[] = [];
  const thickSg: number[] = [];
  const thickY: number[] = [];
  // Positions of the coupons with a hardness, and with a swelling, for their plots.
  const hardAt: number[] = [];
  const swellAt: number[] = [];
  for (let i = 0; i < n; i++) {
    if (cols.hardnessScale[i] !== 0) hardAt.push(i);
    const swelling = cols.swellingPct[i] as number;
    if (swelling === swelling) swellAt.push(i);
    if (cols.control[i] === 1) {
      controls.push(i);
      continue;
    }
    const sg = sgCol[i] as number;
    const wpg = cols.wpgPct[i] as number;
    if (wpg !== wpg || sg !== sg) {
      const c = cols.coupon(i);
      excluded.push({ id: c.id, tag: c.tag, reasons: exclusionReasons(c, sgBasis) });
      continue;
    }
    included.push(i);
    sgX.push(sg);
    wpgY.push(wpg);
    const th = cols.thicknessMm[i] as number;
    if (th === th) {
      thickAt.push(i);
      thickX.push(th);
      thickSg.push(sg);
      thickY.push(wpg);
    }
  }
  const sgPts: Points = { cols, at: included, x: sgX, y: wpgY };
  const thickPts: Points = { cols, at: thickAt, x: thickX, y: thickY };

  const fitNotes: string[] = [];
  const noThickness = included.length - thickAt.length;
  if (noThickness > 0) fitNotes.push(`${noThickness} included coupon(s) have no thickness and are left out of the thickness fits.`);
  const density = simpleFit('density', sgX, wpgY);
  const thickness = simpleFit('thickness', thickX, thickY);
  const multiple = multipleFit(thickSg, thickX, thickY);
  const densityOk: SimpleFitResult | null = 'note' in density ? null : density;
  for (const f of [density, thickness, multiple]) if ('note' in f) fitNotes.push(f.note);
  const outliers = findOutliers(sgPts, densityOk);
  const keep = new Set(outliers.map((o) => o.id));

  const sgDrawn = drawn(cols, included, maxPoints, keep);
  // Residuals against fitted: the same coupons as the WPG–SG plot, so the same sample.
  const residuals = (() => {
    if (!densityOk) return { points: [], total: 0, shown: 0, method: 'all' as const };
    const { intercept, slope } = densityOk.linear;
    return pointSet(sgPts, sgDrawn, (i) => {
      const fitted = intercept + slope * (sgX[i] as number);
      return [fitted, (wpgY[i] as number) - fitted];
    });
  })();
  const byRole = (c: AnalysisCoupon) => (c.role === 'control' ? 'control' : (c.resinName ?? '—'));
  const hardness: Overview['plots']['hardness'] = every(hardAt, maxPoints).map((i) => {
    const c = cols.coupon(i);
    return {
      id: c.id,
      tag: c.tag,
      species: c.speciesName,
      resin: byRole(c),
      role: c.role,
      scale: SCALE_CODES[cols.hardnessScale[i] as number] as NonNullable<AnalysisCoupon['hardnessScale']>,
      value: cols.hardnessValue[i] as number,
    };
  });
  const swelling: Overview['plots']['swelling'] = every(swellAt, maxPoints).map((i) => {
    const c = cols.coupon(i);
    return {
      id: c.id,
      tag: c.tag,
      species: c.speciesName,
      resin: byRole(c),
      role: c.role,
      swellingPct: c.swellingPct as number,
      asePct: c.asePct,
      wrePct: c.wrePct,
    };
  });

  return {
    sgBasis,
    counts: { matched: n, treatedIncluded: included.length, controls: controls.length, excluded: excluded.length },
    groups: speciesResinGroups(cols, included, controls),
    excluded,
    densityFit: densityOk?.fit ?? null,
    thicknessFit: 'note' in thickness ? null : thickness.fit,
    multipleFit: 'note' in multiple ? null : multiple,
    fitNotes,
    theoreticalMax: theoreticalMax(sgPts),
    outliers,
    plots: {
      wpgVsSg: pointSet(sgPts, sgDrawn),
      wpgVsThickness: pointSet(thickPts, drawn(cols, thickAt, maxPoints, keep)),
      residuals,
      hardness,
      swelling,
    },
  };
}
