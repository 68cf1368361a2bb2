import type { AnalysisCoupon, Overview, PlotPoint, SgBasis } from '../schemas/analysis';
import { exclusionReasons, sgOf, speciesResinGroups } from './groups';
import { findOutliers, multipleFit, simpleFit, theoreticalMax, type Points, type SimpleFitResult } from './fits';
import { MAX_PLOT_POINTS, thinTo } from './thin';

const point = (c: AnalysisCoupon, x: number, y: number): PlotPoint => ({
  id: c.id,
  tag: c.tag,
  species: c.speciesName,
  resin: c.resinName ?? '—',
  x,
  y,
});

/** Thinning groups: species × resin, as a number (ids are small positive integers), so no string per coupon. */
const plotGroup = (c: AnalysisCoupon) => c.speciesId * 1e7 + (c.resinId ?? 0);

/** Thin a set of points held as parallel arrays, building plot points only for those drawn. */
function thinned(pts: Points, max: number, keep: ReadonlySet<number>, xy: (i: number) => [number, number] = (i) => [pts.x[i] as number, pts.y[i] as number]) {
  const idx = pts.coupons.map((_c, i) => i);
  return thinTo(
    idx,
    (i) => plotGroup(pts.coupons[i] as AnalysisCoupon),
    (i) => (pts.coupons[i] as AnalysisCoupon).id,
    (i) => point(pts.coupons[i] as AnalysisCoupon, ...xy(i)),
    max,
    keep,
  );
}

/** A plain sample of a list for the plots without a fit (every k-th item), kept as before. */
function every<T>(list: T[], max: number): T[] {
  return list.length > max ? list.filter((_, i) => i % Math.ceil(list.length / max) === 0) : list;
}

/**
 * Everything the Compare screen shows for one set of filtered coupons, computed in one pass over the
 * results rows: who is included and who is excluded (with reasons), the species × resin table, the
 * three fits, the theoretical maximum, outliers and the plot data (thinned above `maxPoints`).
 */
export function buildOverview(rows: readonly AnalysisCoupon[], sgBasis: SgBasis, maxPoints = MAX_PLOT_POINTS): Overview {
  const included: AnalysisCoupon[] = [];
  const controls: AnalysisCoupon[] = [];
  const excluded: Overview['excluded'] = [];
  const sgX: number[] = [];
  const wpgY: number[] = [];
  // The subset with a thickness, for the thickness fits.
  const thickCoupons: AnalysisCoupon[] = [];
  const thickX: number[] = [];
  const thickSg: number[] = [];
  const thickY: number[] = [];
  for (const c of rows) {
    if (c.role === 'control') {
      controls.push(c);
      continue;
    }
    const sg = sgOf(c, sgBasis);
    if (c.wpgPct === null || sg === null) {
      excluded.push({ id: c.id, tag: c.tag, reasons: exclusionReasons(c, sgBasis) });
      continue;
    }
    included.push(c);
    sgX.push(sg);
    wpgY.push(c.wpgPct);
    if (c.thicknessMm !== null) {
      thickCoupons.push(c);
      thickX.push(c.thicknessMm);
      thickSg.push(sg);
      thickY.push(c.wpgPct);
    }
  }
  const sgPts: Points = { coupons: included, x: sgX, y: wpgY };
  const thickPts: Points = { coupons: thickCoupons, x: thickX, y: thickY };

  const fitNotes: string[] = [];
  const noThickness = included.length - thickCoupons.length;
  if (noThickness > 0) fitNotes.push(`${noThickness} included coupon(s) have no thickness and are left out of the thickness fits.`);
  const density = simpleFit('density', sgX, wpgY);
  const thickness = simpleFit('thickness', thickX, thickY);
  const multiple = multipleFit(thickSg, thickX, thickY);
  const densityOk: SimpleFitResult | null = 'note' in density ? null : density;
  for (const f of [density, thickness, multiple]) if ('note' in f) fitNotes.push(f.note);
  const outliers = findOutliers(sgPts, densityOk, rows);
  const keep = new Set(outliers.map((o) => o.id));

  // Residuals against fitted: the same coupons as the WPG–SG plot, so the same thinning applies.
  const residuals = (() => {
    if (!densityOk) return { points: [], total: 0, shown: 0, method: 'all' as const };
    const { intercept, slope } = densityOk.linear;
    return thinned(sgPts, maxPoints, keep, (i) => {
      const fitted = intercept + slope * (sgX[i] as number);
      return [fitted, (wpgY[i] as number) - fitted];
    });
  })();
  const hardness: Overview['plots']['hardness'] = [];
  const swelling: Overview['plots']['swelling'] = [];
  for (const c of rows) {
    if (c.hardnessValue !== null && c.hardnessScale !== null)
      hardness.push({
        id: c.id,
        tag: c.tag,
        species: c.speciesName,
        resin: c.role === 'control' ? 'control' : (c.resinName ?? '—'),
        role: c.role,
        scale: c.hardnessScale,
        value: c.hardnessValue,
      });
    if (c.swellingPct !== null)
      swelling.push({
        id: c.id,
        tag: c.tag,
        species: c.speciesName,
        resin: c.role === 'control' ? 'control' : (c.resinName ?? '—'),
        role: c.role,
        swellingPct: c.swellingPct,
        asePct: c.asePct,
        wrePct: c.wrePct,
      });
  }

  return {
    sgBasis,
    counts: { matched: rows.length, treatedIncluded: included.length, controls: controls.length, excluded: excluded.length },
    groups: speciesResinGroups(included, controls),
    excluded,
    densityFit: densityOk?.fit ?? null,
    thicknessFit: 'note' in thickness ? null : thickness.fit,
    multipleFit: 'note' in multiple ? null : multiple,
    fitNotes,
    theoreticalMax: theoreticalMax(sgPts),
    outliers,
    plots: {
      wpgVsSg: thinned(sgPts, maxPoints, keep),
      wpgVsThickness: thinned(thickPts, maxPoints, keep),
      residuals,
      hardness: every(hardness, maxPoints),
      swelling: every(swelling, maxPoints),
    },
  };
}
