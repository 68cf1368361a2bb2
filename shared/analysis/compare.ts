import { DomainError, welchTest } from '../domain/index';
import type { WelchResult } from '../domain/index';
import type { AnalysisCoupon, CompareMetric, CompareResult, GroupSpec } from '../schemas/analysis';
import { COMPARE_METRIC_LABELS } from '../schemas/analysis';
import { boardCounts } from './groups';
import { fmt, fmtP, statsOf } from './stats';

/** Below this many coupons (or boards) per group, a comparison is flagged as too small to say much. */
export const SMALL_GROUP_N = 5;

export const HEDGES_G_NOTE =
  "Hedges' g is the difference in means divided by the pooled standard deviation of the two groups " +
  '(the standardizer), times the small-sample correction J = 1 − 3/(4(nA + nB) − 9) (Hedges 1981).';

/** True when a coupon matches every key the group names. */
export function inGroup(c: AnalysisCoupon, g: GroupSpec): boolean {
  return (
    (g.speciesId === undefined || c.speciesId === g.speciesId) &&
    (g.resinId === undefined || c.resinId === g.resinId) &&
    (g.lotId === undefined || c.lotId === g.lotId) &&
    (g.runId === undefined || c.runId === g.runId) &&
    (g.conditionId === undefined || c.conditionId === g.conditionId) &&
    (g.role === undefined || c.role === g.role)
  );
}

/** A group's name for sentences: its label, else its species and resin. */
export function groupLabel(g: GroupSpec, members: readonly AnalysisCoupon[], fallback: string): string {
  if (g.label) return g.label;
  const first = members[0];
  if (!first) return fallback;
  const parts: string[] = [];
  if (g.resinId !== undefined) parts.push(first.resinName ?? 'no resin');
  if (g.speciesId !== undefined) parts.push(first.speciesName);
  if (g.runId !== undefined) parts.push(`run ${first.runCode ?? g.runId}`);
  if (g.role !== undefined) parts.push(g.role);
  return parts.length > 0 ? parts.join(' in ') : fallback;
}

interface Valued {
  coupon: AnalysisCoupon;
  value: number;
}

function values(list: readonly AnalysisCoupon[], metric: CompareMetric, scale: string | null): Valued[] {
  const out: Valued[] = [];
  for (const c of list) {
    const v = metric === 'hardness' ? (c.hardnessScale === scale ? c.hardnessValue : null) : c[metric];
    if (v !== null && Number.isFinite(v)) out.push({ coupon: c, value: v });
  }
  return out;
}

/** Means per source board; a coupon with no board named is its own unit. */
export function boardMeans(list: readonly Valued[]): number[] {
  const units = new Map<string, { s: number; n: number }>();
  for (const { coupon, value } of list) {
    const k = coupon.sourceBoard ? `b:${coupon.sourceBoard}` : `c:${coupon.id}`;
    const u = units.get(k) ?? { s: 0, n: 0 };
    u.s += value;
    u.n++;
    units.set(k, u);
  }
  return [...units.values()].map((u) => u.s / u.n);
}

function tryWelch(a: number[], b: number[]): WelchResult | null {
  if (a.length < 2 || b.length < 2) return null;
  try {
    return welchTest(a, b);
  } catch (e) {
    if (e instanceof DomainError) return null;
    throw e;
  }
}

function side(label: string, xs: readonly number[], nBoards: number): CompareResult['a'] {
  const s = statsOf(xs);
  return { label, n: xs.length, nBoards, mean: s?.mean ?? 0, sd: s?.sd ?? 0 };
}

/**
 * Two groups compared on one metric: Welch's t test on coupons (the core's `welchTest`) and, when
 * coupons share source boards within a group, the same test on board means — coupons cut from one
 * board are not independent, so then the board-mean result is the one to trust. One plain sentence
 * states the trusted result with both n; warnings say when the groups are too small to say much.
 */
export function compareGroups(rows: readonly AnalysisCoupon[], a: GroupSpec, b: GroupSpec, metric: CompareMetric): CompareResult {
  const membersA = rows.filter((c) => inGroup(c, a));
  const membersB = rows.filter((c) => inGroup(c, b));
  const warnings: string[] = [];
  let scale: string | null = null;
  let unit = COMPARE_METRIC_LABELS[metric].unit;
  if (metric === 'hardness') {
    const counts = new Map<string, number>();
    for (const c of membersA) if (c.hardnessScale) counts.set(c.hardnessScale, (counts.get(c.hardnessScale) ?? 0) + 1);
    scale = [...counts.entries()].sort((x, y) => y[1] - x[1])[0]?.[0] ?? null;
    unit = scale ?? '';
    if (counts.size > 1) warnings.push(`Hardness was read on more than one scale; only ${scale} readings are compared (scales are never converted).`);
  }
  const va = values(membersA, metric, scale);
  const vb = values(membersB, metric, scale);
  const labelA = groupLabel(a, membersA, 'group A');
  const labelB = groupLabel(b, membersB, 'group B');
  const idsB = new Set(vb.map((y) => y.coupon.id));
  const overlap = va.filter((x) => idsB.has(x.coupon.id)).length;
  if (overlap > 0) warnings.push(`${overlap} coupon(s) fall in both groups; pick groups that do not overlap.`);
  const xa = va.map((v) => v.value);
  const xb = vb.map((v) => v.value);
  const bcA = boardCounts(va.map((v) => v.coupon));
  const bcB = boardCounts(vb.map((v) => v.coupon));
  const welch = tryWelch(xa, xb);
  const repeats = bcA.nBoards + bcA.nNoBoard < xa.length || bcB.nBoards + bcB.nNoBoard < xb.length;
  let board: CompareResult['boardMeans'] = null;
  if (repeats) {
    const ma = boardMeans(va);
    const mb = boardMeans(vb);
    const w = tryWelch(ma, mb);
    if (w) board = { nA: ma.length, nB: mb.length, ...w };
    else warnings.push(`Coupons share source boards, but there are too few boards (${ma.length} and ${mb.length}) for a test on board means.`);
  }
  const trust: CompareResult['trust'] = repeats ? 'board-means' : 'coupons';
  const metricLabel = COMPARE_METRIC_LABELS[metric].label;
  const u = unit ? ` ${unit}` : '';
  const nText = `${xa.length} coupons${bcA.nBoards ? ` from ${bcA.nBoards + bcA.nNoBoard} boards` : ''} and ${xb.length} coupons${bcB.nBoards ? ` from ${bcB.nBoards + bcB.nNoBoard} boards` : ''}`;

  if (xa.length < 2 || xb.length < 2) warnings.push('Each group needs at least 2 coupons with this metric for a test.');
  else if (xa.length < SMALL_GROUP_N || xb.length < SMALL_GROUP_N)
    warnings.push(
      `With fewer than ${SMALL_GROUP_N} coupons in a group the interval is wide and a real difference can easily be missed; read this as a first look, not an answer.`,
    );
  if (repeats && board && (board.nA < SMALL_GROUP_N || board.nB < SMALL_GROUP_N))
    warnings.push(`Only ${board.nA} and ${board.nB} source boards: the honest n is the number of boards, and it is small.`);

  const used = trust === 'board-means' && board ? board : welch;
  let sentence: string;
  if (!used) {
    sentence = `No test: ${labelA} has ${xa.length} and ${labelB} has ${xb.length} coupons with a ${metricLabel} value.`;
  } else {
    const d = used.meanDiff;
    const more = d >= 0 ? 'more' : 'less';
    const basis =
      used === board ? ` (compared on the means of ${board.nA} and ${board.nB} source boards, since coupons from one board are not independent)` : '';
    const clear = used.ci95[0] > 0 || used.ci95[1] < 0;
    sentence =
      `${labelA} averaged ${fmt(Math.abs(d))}${u} ${metricLabel} ${more} than ${labelB}, from ${nText}${basis}; ` +
      `the 95 % confidence interval of the difference runs from ${fmt(used.ci95[0])} to ${fmt(used.ci95[1])}${u} ` +
      `(Welch t = ${fmt(used.t, 2)}, df = ${fmt(used.df)}, p ${fmtP(used.p)}). ` +
      (clear
        ? `The interval excludes zero, so the data show a real difference of at least ${fmt(Math.min(Math.abs(used.ci95[0]), Math.abs(used.ci95[1])))}${u}.`
        : 'The interval includes zero, so these data cannot say which group is higher.');
  }
  return {
    metric,
    unit,
    a: side(labelA, xa, bcA.nBoards + bcA.nNoBoard),
    b: side(labelB, xb, bcB.nBoards + bcB.nNoBoard),
    welch,
    boardMeans: board,
    trust,
    sentence,
    warnings,
    effectSizeNote: HEDGES_G_NOTE,
  };
}
