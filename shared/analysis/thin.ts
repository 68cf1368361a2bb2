import type { PlotPoint, PointSet } from '../schemas/analysis';

/**
 * Above this many points a plot is thinned on the server. Drawing is the cost: measured in Chromium
 * (bench/compare-render.ts), most of a plot's time is the browser laying out and painting one SVG element
 * per dot, so the budget is set where a screen of five plots stays quick.
 */
export const MAX_PLOT_POINTS = 2000;

/**
 * Thinning, not binning: when there are more than `max` items, a systematic sample is drawn within
 * each species × resin (every k-th item in id order, k = group size / its share of `max`), so every
 * group keeps its share and its colour and symbol; `keep` (the outliers) is always drawn. Fits, tables
 * and tests always use every coupon; only the drawing is thinned, and the caption says so with counts.
 *
 * Works on whatever the caller holds (coupons with their x and y) and returns the positions chosen, so
 * plot points are built only for what is drawn, not for a hundred thousand coupons first.
 */
export function thinIndices<T>(
  items: readonly T[],
  groupOf: (item: T) => string | number,
  idOf: (item: T) => number,
  max = MAX_PLOT_POINTS,
  keep: ReadonlySet<number> = new Set(),
): number[] | null {
  if (items.length <= max) return null;
  return thinPositions(items.map(idOf), items.map(groupOf), max, keep);
}

/**
 * The sampling of `thinIndices` over columns: `ids[i]` and `groups[i]` of the item at position i (a
 * reader that holds columns passes them as they are, so nothing is built per item). Returns the positions
 * drawn, or null when all `ids.length` items fit within `max`.
 */
export function thinPositions(
  ids: ArrayLike<number>,
  groups: ArrayLike<string | number>,
  max = MAX_PLOT_POINTS,
  keep: ReadonlySet<number> = new Set(),
): number[] | null {
  const total = ids.length;
  if (total <= max) return null;
  const byGroup = new Map<string | number, number[]>();
  for (let i = 0; i < total; i++) {
    const k = groups[i] as string | number;
    const g = byGroup.get(k);
    if (g) g.push(i);
    else byGroup.set(k, [i]);
  }
  const chosen: number[] = [];
  const budget = Math.max(0, max - keep.size);
  const checkKeep = keep.size > 0;
  for (const g of byGroup.values()) {
    // Items usually arrive in id order already; sort only when they do not.
    let sorted = true;
    for (let j = 1; j < g.length && sorted; j++) if ((ids[g[j] as number] as number) < (ids[g[j - 1] as number] as number)) sorted = false;
    if (!sorted) g.sort((a, b) => (ids[a] as number) - (ids[b] as number));
    const quota = Math.max(1, Math.round((budget * g.length) / total));
    const step = g.length / quota;
    for (let j = 0; j < quota; j++) {
      const i = g[Math.floor(j * step)] as number;
      if (!checkKeep || !keep.has(ids[i] as number)) chosen.push(i);
    }
  }
  if (checkKeep) for (let i = 0; i < total; i++) if (keep.has(ids[i] as number)) chosen.push(i);
  return chosen;
}

/** `thinIndices` over items, building a plot point only for each item drawn. */
export function thinTo<T>(
  items: readonly T[],
  groupOf: (item: T) => string | number,
  idOf: (item: T) => number,
  toPoint: (item: T) => PlotPoint,
  max = MAX_PLOT_POINTS,
  keep: ReadonlySet<number> = new Set(),
): PointSet {
  const total = items.length;
  const chosen = thinIndices(items, groupOf, idOf, max, keep);
  if (chosen === null) return { points: items.map(toPoint), total, shown: total, method: 'all' };
  const points = chosen.map((i) => toPoint(items[i] as T));
  return { points, total, shown: points.length, method: 'thinned' };
}

/** Thinning of ready-made plot points (grouped by their species and resin names). */
export function thinPoints(points: readonly PlotPoint[], max = MAX_PLOT_POINTS, keep: ReadonlySet<number> = new Set()): PointSet {
  return thinTo(
    points,
    (p) => `${p.species}|${p.resin}`,
    (p) => p.id,
    (p) => p,
    max,
    keep,
  );
}
