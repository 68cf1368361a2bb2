import type { AnalysisCoupon, Overview, PlotPoint, SgBasis } from '../schemas/analysis';
import { exclusionReasons, sgOf, speciesResinGroups } from './groups';
import { findOutliers, multipleFit, simpleFit, theoreticalMax, type SimpleFitResult, type XY } from './fits';
import { MAX_PLOT_POINTS, thinPoints } from './thin';

const point = (c: AnalysisCoupon, x: number, y: number): PlotPoint => ({
  id: c.id,
  tag: c.tag,
  species: c.speciesName,
  resin: c.resinName ?? '—',
  x,
  y,
});

/**
 * Everything the Compare screen shows for one set of filtered coupons, computed in one pass over the
 * results rows: who is included and who is excluded (with reasons), the species × resin table, the
 * three fits, the theoretical maximum, outliers and the plot data (thinned above `maxPoints`).
 */
export function buildOverview(rows: readonly AnalysisCoupon[], sgBasis: SgBasis, maxPoints = MAX_PLOT_POINTS): Overview {
  const included: AnalysisCoupon[] = [];
  const controls: AnalysisCoupon[] = [];
  const excluded: Overview['excluded'] = [];
  for (const c of rows) {
    if (c.role === 'control') {
      controls.push(c);
      continue;
    }
    if (c.wpgPct !== null && sgOf(c, sgBasis) !== null) included.push(c);
    else excluded.push({ id: c.id, tag: c.tag, reasons: exclusionReasons(c, sgBasis) });
  }

  const sgPts: XY[] = included.map((c) => ({ c, x: sgOf(c, sgBasis) as number, y: c.wpgPct as number }));
  const thickPts: XY[] = [];
  const bothPts: { sg: number; thickness: number; y: number }[] = [];
  for (const p of sgPts) {
    if (p.c.thicknessMm === null) continue;
    thickPts.push({ c: p.c, x: p.c.thicknessMm, y: p.y });
    bothPts.push({ sg: p.x, thickness: p.c.thicknessMm, y: p.y });
  }
  const fitNotes: string[] = [];
  const noThickness = sgPts.length - thickPts.length;
  if (noThickness > 0) fitNotes.push(`${noThickness} included coupon(s) have no thickness and are left out of the thickness fits.`);
  const density = simpleFit('density', sgPts);
  const thickness = simpleFit('thickness', thickPts);
  const multiple = multipleFit(bothPts);
  const densityOk: SimpleFitResult | null = 'note' in density ? null : density;
  for (const f of [density, thickness, multiple]) if ('note' in f) fitNotes.push(f.note);
  const outliers = findOutliers(sgPts, densityOk, rows);
  const keep = new Set(outliers.map((o) => o.id));

  const residualPts: PlotPoint[] = [];
  if (densityOk) {
    const { intercept, slope } = densityOk.linear;
    for (const p of sgPts) {
      const fitted = intercept + slope * p.x;
      residualPts.push(point(p.c, fitted, p.y - fitted));
    }
  }
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
      wpgVsSg: thinPoints(
        sgPts.map((p) => point(p.c, p.x, p.y)),
        maxPoints,
        keep,
      ),
      wpgVsThickness: thinPoints(
        thickPts.map((p) => point(p.c, p.x, p.y)),
        maxPoints,
        keep,
      ),
      residuals: thinPoints(residualPts, maxPoints, keep),
      hardness: hardness.length > maxPoints ? hardness.filter((_, i) => i % Math.ceil(hardness.length / maxPoints) === 0) : hardness,
      swelling: swelling.length > maxPoints ? swelling.filter((_, i) => i % Math.ceil(swelling.length / maxPoints) === 0) : swelling,
    },
  };
}
