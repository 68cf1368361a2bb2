import { DomainError, welchTest } from '../domain/index';
import type { WelchResult } from '../domain/index';
import type { AnalysisCoupon, CompareMetric, CompareResult, GroupSpec } from '../schemas/analysis';
import { COMPARE_METRIC_LABELS } from '../schemas/analysis';
import { columnsOf, isColumns, SCALE_CODES, type CouponColumns } from './columns';
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

/** Means per source board; a coupon with no board named is its own unit. */
export function boardMeans(list: readonly Valued[]): number[] {
  // Keyed by the board's name, or by the coupon's id (a number, so it never meets a board name): no string per coupon.
  const units = new Map<string | number, { s: number; n: number }>();
  for (const { coupon, value } of list) {
    const k = coupon.sourceBoard ? coupon.sourceBoard : coupon.id;
    const u = units.get(k);
    if (u) {
      u.s += value;
      u.n++;
    } else units.set(k, { s: value, n: 1 });
  }
  return [...units.values()].map((u) => u.s / u.n);
}

/** A group's members in column positions, with their values of the metric (positions and values side by side). */
interface Side {
  at: number[];
  values: number[];
}

/** Board means over column positions: the same units, order and sums as boardMeans. */
function boardMeansOf(cols: CouponColumns, side: Side): number[] {
  const units = new Map<number, { s: number; n: number }>();
  for (let i = 0; i < side.at.length; i++) {
    const p = side.at[i] as number;
    const b = cols.board[p] as number;
    // Boards by their index (≥ 0); a coupon with none by −1 − its id, so the two never meet.
    const k = b >= 0 ? b : -1 - (cols.id[p] as number);
    const value = side.values[i] as number;
    const u = units.get(k);
    if (u) {
      u.s += value;
      u.n++;
    } else units.set(k, { s: value, n: 1 });
  }
  return [...units.values()].map((u) => u.s / u.n);
}

function boardCountsOf(cols: CouponColumns, at: readonly number[]): { nBoards: number; nNoBoard: number } {
  const boards = new Set<number>();
  let nNoBoard = 0;
  for (const p of at) {
    const b = cols.board[p] as number;
    if (b >= 0) boards.add(b);
    else nNoBoard++;
  }
  return { nBoards: boards.size, nNoBoard };
}

/** Positions of the coupons that match every key the group names, read from the columns. */
function membersOf(cols: CouponColumns, g: GroupSpec): number[] {
  const out: number[] = [];
  const control = g.role === undefined ? -1 : g.role === 'control' ? 1 : 0;
  for (let i = 0; i < cols.n; i++) {
    if (g.speciesId !== undefined && cols.speciesId[i] !== g.speciesId) continue;
    if (g.resinId !== undefined && cols.resinId[i] !== g.resinId) continue;
    if (g.lotId !== undefined && cols.lotId[i] !== g.lotId) continue;
    if (g.runId !== undefined && cols.runId[i] !== g.runId) continue;
    if (g.conditionId !== undefined && cols.conditionId[i] !== g.conditionId) continue;
    if (control >= 0 && cols.control[i] !== control) continue;
    out.push(i);
  }
  return out;
}

const METRIC_COLUMNS = {
  wpgPct: 'wpgPct',
  resinLoadingKgM3: 'resinLoadingKgM3',
  voidFillPct: 'voidFillPct',
  swellingPct: 'swellingPct',
  asePct: 'asePct',
  wrePct: 'wrePct',
  hardness: 'hardnessValue',
} as const satisfies Record<CompareMetric, keyof CouponColumns>;

/** The members with a value of the metric (hardness: on `scale` only), and those values. */
function sideOf(cols: CouponColumns, members: readonly number[], metric: CompareMetric, scale: number): Side {
  const column = cols[METRIC_COLUMNS[metric]];
  const at: number[] = [];
  const values: number[] = [];
  for (const p of members) {
    if (metric === 'hardness' && cols.hardnessScale[p] !== scale) continue;
    const v = column[p] as number;
    if (Number.isFinite(v)) {
      at.push(p);
      values.push(v);
    }
  }
  return { at, values };
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
export function compareGroups(rows: readonly AnalysisCoupon[] | CouponColumns, a: GroupSpec, b: GroupSpec, metric: CompareMetric): CompareResult {
  const cols = isColumns(rows) ? rows : columnsOf(rows);
  const membersA = membersOf(cols, a);
  const membersB = membersOf(cols, b);
  const warnings: string[] = [];
  let scale = 0;
  let unit = COMPARE_METRIC_LABELS[metric].unit;
  if (metric === 'hardness') {
    // The scale most of group A was read on; a tie goes to the scale met first.
    const counts = new Map<number, number>();
    for (const p of membersA) {
      const s = cols.hardnessScale[p] as number;
      if (s !== 0) counts.set(s, (counts.get(s) ?? 0) + 1);
    }
    scale = [...counts.entries()].sort((x, y) => y[1] - x[1])[0]?.[0] ?? 0;
    unit = SCALE_CODES[scale] ?? '';
    if (counts.size > 1)
      warnings.push(`Hardness was read on more than one scale; only ${SCALE_CODES[scale]} readings are compared (scales are never converted).`);
  }
  const va = sideOf(cols, membersA, metric, scale);
  const vb = sideOf(cols, membersB, metric, scale);
  const labelA = groupLabel(a, membersA.length ? [cols.coupon(membersA[0] as number)] : [], 'group A');
  const labelB = groupLabel(b, membersB.length ? [cols.coupon(membersB[0] as number)] : [], 'group B');
  const inB = new Set(vb.at);
  let overlap = 0;
  for (const p of va.at) if (inB.has(p)) overlap++;
  if (overlap > 0) warnings.push(`${overlap} coupon(s) fall in both groups; pick groups that do not overlap.`);
  const xa = va.values;
  const xb = vb.values;
  const bcA = boardCountsOf(cols, va.at);
  const bcB = boardCountsOf(cols, vb.at);
  const welch = tryWelch(xa, xb);
  const repeats = bcA.nBoards + bcA.nNoBoard < xa.length || bcB.nBoards + bcB.nNoBoard < xb.length;
  let board: CompareResult['boardMeans'] = null;
  if (repeats) {
    const ma = boardMeansOf(cols, va);
    const mb = boardMeansOf(cols, vb);
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
