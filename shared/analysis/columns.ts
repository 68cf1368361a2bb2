import type { HardnessScale } from '../constants/records';
import type { AnalysisCoupon } from '../schemas/analysis';

/** Hardness scales as small numbers in a column (0: none), in the order the results table prefers them. */
export const SCALE_CODES: readonly (HardnessScale | null)[] = [null, 'shore-d', 'janka-n', 'brinell-hb'];

/**
 * A set of coupons held column by column: one typed array per number the arithmetic reads, NaN where
 * the coupon has none, position i the same coupon in every column and in `coupons`. The tables, fits,
 * tests and plot samples loop over these arrays, which sit side by side in memory, instead of visiting a
 * hundred thousand objects; `coupons[i]` is read only for what is shown (a drawn point, an excluded
 * coupon, an outlier, a group's names).
 */
export interface CouponColumns {
  readonly n: number;
  readonly coupons: readonly AnalysisCoupon[];
  readonly id: Float64Array;
  readonly speciesId: Float64Array;
  /** NaN: no resin. */
  readonly resinId: Float64Array;
  readonly lotId: Float64Array;
  readonly runId: Float64Array;
  readonly conditionId: Float64Array;
  /** 1 for a control, 0 for a treated coupon. */
  readonly control: Uint8Array;
  /** Index into `boards`, −1 when no board is named. */
  readonly board: Int32Array;
  readonly boards: readonly string[];
  /** Board name → index in `boards`. */
  readonly boardIndex: ReadonlyMap<string, number>;
  readonly thicknessMm: Float64Array;
  readonly drySg: Float64Array;
  readonly referenceSg: Float64Array;
  readonly referenceSgCov: Float64Array;
  readonly wpgPct: Float64Array;
  readonly resinLoadingKgM3: Float64Array;
  readonly voidFillPct: Float64Array;
  readonly swellingPct: Float64Array;
  readonly asePct: Float64Array;
  readonly wrePct: Float64Array;
  readonly hardnessValue: Float64Array;
  /** SCALE_CODES index, 0 when there is no hardness. */
  readonly hardnessScale: Uint8Array;
}

const nan = (v: number | null): number => (v === null ? Number.NaN : v);

type Writable<T> = { -readonly [K in keyof T]: T[K] };

/** Writes coupon c into position i of every column (boards named for the first time are added). */
function put(cols: Writable<CouponColumns> & { boards: string[]; boardIndex: Map<string, number> }, i: number, c: AnalysisCoupon): void {
  cols.id[i] = c.id;
  cols.speciesId[i] = c.speciesId;
  cols.resinId[i] = nan(c.resinId);
  cols.lotId[i] = nan(c.lotId);
  cols.runId[i] = nan(c.runId);
  cols.conditionId[i] = nan(c.conditionId);
  cols.control[i] = c.role === 'control' ? 1 : 0;
  // An empty name counts as no board, as everywhere else ("coupon.sourceBoard ? … : …").
  if (c.sourceBoard) {
    let b = cols.boardIndex.get(c.sourceBoard);
    if (b === undefined) {
      b = cols.boards.length;
      cols.boards.push(c.sourceBoard);
      cols.boardIndex.set(c.sourceBoard, b);
    }
    cols.board[i] = b;
  } else cols.board[i] = -1;
  cols.thicknessMm[i] = nan(c.thicknessMm);
  cols.drySg[i] = nan(c.drySg);
  cols.referenceSg[i] = nan(c.referenceSg);
  cols.referenceSgCov[i] = nan(c.referenceSgCov);
  cols.wpgPct[i] = nan(c.wpgPct);
  cols.resinLoadingKgM3[i] = nan(c.resinLoadingKgM3);
  cols.voidFillPct[i] = nan(c.voidFillPct);
  cols.swellingPct[i] = nan(c.swellingPct);
  cols.asePct[i] = nan(c.asePct);
  cols.wrePct[i] = nan(c.wrePct);
  // A value without a scale (or a scale without a value) is no hardness, as the overview has always read it.
  const scale = c.hardnessValue === null ? 0 : SCALE_CODES.indexOf(c.hardnessScale);
  cols.hardnessScale[i] = scale > 0 ? scale : 0;
  cols.hardnessValue[i] = scale > 0 ? (c.hardnessValue as number) : Number.NaN;
}

/** The columns of a list of coupons (one pass; the list is kept as `coupons`). */
export function columnsOf(coupons: readonly AnalysisCoupon[]): CouponColumns {
  const n = coupons.length;
  const f = () => new Float64Array(n);
  const cols = {
    n,
    coupons,
    id: f(),
    speciesId: f(),
    resinId: f(),
    lotId: f(),
    runId: f(),
    conditionId: f(),
    control: new Uint8Array(n),
    board: new Int32Array(n),
    boards: [] as string[],
    boardIndex: new Map<string, number>(),
    thicknessMm: f(),
    drySg: f(),
    referenceSg: f(),
    referenceSgCov: f(),
    wpgPct: f(),
    resinLoadingKgM3: f(),
    voidFillPct: f(),
    swellingPct: f(),
    asePct: f(),
    wrePct: f(),
    hardnessValue: f(),
    hardnessScale: new Uint8Array(n),
  };
  for (let i = 0; i < n; i++) put(cols, i, coupons[i] as AnalysisCoupon);
  return cols;
}

/**
 * The columns of `coupons`, a list that differs from `old.coupons` only at the positions `changed` (same
 * length, same coupon at every other position): the columns are taken over and those positions written
 * again, so a few corrected coupons cost a few writes, not a pass over every coupon. `old` must not be
 * used afterwards (its arrays now hold the new values).
 */
export function withChanged(old: CouponColumns, coupons: readonly AnalysisCoupon[], changed: readonly number[]): CouponColumns {
  if (coupons.length !== old.n) throw new Error('withChanged: the lists differ in length');
  const cols = { ...old, coupons, boards: old.boards as string[], boardIndex: old.boardIndex as Map<string, number> };
  for (const i of changed) put(cols, i, coupons[i] as AnalysisCoupon);
  return cols;
}
