import type { HardnessScale } from '../constants/records';
import type { AnalysisCoupon } from '../schemas/analysis';

/** Hardness scales as small numbers in a column (0: none), in the order the results table prefers them. */
export const SCALE_CODES: readonly (HardnessScale | null)[] = [null, 'shore-d', 'janka-n', 'brinell-hb'];

/**
 * A set of coupons held column by column: one typed array per number the arithmetic reads, NaN where
 * the coupon has none, position i the same coupon in every column and in `coupons`. The tables, fits,
 * tests and plot samples loop over these arrays, which sit side by side in memory, instead of visiting a
 * hundred thousand objects; `coupon(i)` is asked only for what is shown (a drawn point, an excluded
 * coupon, an outlier, a group's names), so a set read straight into columns (the server's) makes an
 * object only for those.
 */
export interface CouponColumns {
  readonly n: number;
  /** The coupon at position i as an object (made on demand by a set read into columns). */
  coupon(i: number): AnalysisCoupon;
  readonly id: Float64Array;
  readonly speciesId: Float64Array;
  /** NaN: no resin. */
  readonly resinId: Float64Array;
  readonly lotId: Float64Array;
  readonly runId: Float64Array;
  readonly conditionId: Float64Array;
  /** 1 for a control, 0 for a treated coupon. */
  readonly control: Uint8Array;
  /** A number per named board (equal names, equal numbers), negative when no board is named. */
  readonly board: Int32Array;
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

/** Whether a set of coupons is given as columns (else it is a list of coupons). */
export function isColumns(rows: readonly AnalysisCoupon[] | CouponColumns): rows is CouponColumns {
  return !Array.isArray(rows);
}

/** The columns of a list of coupons (one pass; `coupon(i)` is the list's own object). */
export function columnsOf(coupons: readonly AnalysisCoupon[]): CouponColumns {
  const n = coupons.length;
  const f = () => new Float64Array(n);
  const cols = {
    n,
    coupon: (i: number) => coupons[i] as AnalysisCoupon,
    id: f(),
    speciesId: f(),
    resinId: f(),
    lotId: f(),
    runId: f(),
    conditionId: f(),
    control: new Uint8Array(n),
    board: new Int32Array(n),
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
  const boards = new Map<string, number>();
  for (let i = 0; i < n; i++) {
    const c = coupons[i] as AnalysisCoupon;
    cols.id[i] = c.id;
    cols.speciesId[i] = c.speciesId;
    cols.resinId[i] = nan(c.resinId);
    cols.lotId[i] = nan(c.lotId);
    cols.runId[i] = nan(c.runId);
    cols.conditionId[i] = nan(c.conditionId);
    cols.control[i] = c.role === 'control' ? 1 : 0;
    // An empty name counts as no board, as everywhere else ("coupon.sourceBoard ? … : …").
    if (c.sourceBoard) {
      let b = boards.get(c.sourceBoard);
      if (b === undefined) boards.set(c.sourceBoard, (b = boards.size));
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
  return cols;
}
