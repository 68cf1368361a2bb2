import type { PlotPoint, PointSet } from '../schemas/analysis';

/** Above this many points a plot is thinned on the server. */
export const MAX_PLOT_POINTS = 5000;

/**
 * Thinning, not binning: when there are more than `max` points, a systematic sample is drawn within
 * each species × resin (every k-th point in id order, k = group size / its share of `max`), so every
 * group keeps its share and its colour and symbol; `keep` (the outliers) is always drawn. Fits, tables
 * and tests always use every coupon; only the drawing is thinned, and the caption says so with counts.
 */
export function thinPoints(points: readonly PlotPoint[], max = MAX_PLOT_POINTS, keep: ReadonlySet<number> = new Set()): PointSet {
  const total = points.length;
  if (total <= max) return { points: [...points], total, shown: total, method: 'all' };
  const groups = new Map<string, PlotPoint[]>();
  for (const p of points) {
    const k = `${p.species}|${p.resin}`;
    const g = groups.get(k);
    if (g) g.push(p);
    else groups.set(k, [p]);
  }
  const chosen: PlotPoint[] = [];
  const budget = Math.max(0, max - keep.size);
  for (const g of groups.values()) {
    g.sort((a, b) => a.id - b.id);
    const quota = Math.max(1, Math.round((budget * g.length) / total));
    const step = g.length / quota;
    for (let i = 0; i < quota; i++) {
      const p = g[Math.floor(i * step)] as PlotPoint;
      if (!keep.has(p.id)) chosen.push(p);
    }
  }
  for (const p of points) if (keep.has(p.id)) chosen.push(p);
  return { points: chosen, total, shown: chosen.length, method: 'thinned' };
}
