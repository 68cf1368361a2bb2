import type { CouponOut } from '../../../../shared/schemas/coupons';
import { ENTRY_COLUMNS, rowModel, type Drafts, type RowModel, type SiConverter } from './grid-model';
import type { CellErrors } from './save-plan';

/**
 * The entry grid's typed state outside React: drafts, refusals and the active cell, with subscriptions per
 * row, so a keystroke re-renders the one row it changed (its computed columns follow) instead of the whole
 * grid. Snapshots keep their identity until their row changes, as `useSyncExternalStore` needs.
 */

/** Everything one row shows besides its coupon's stored readings. */
export interface RowState {
  model: RowModel;
  draft: Readonly<Record<string, string>> | undefined;
  /** Refusals from the last save, by column id. */
  errors: Readonly<Record<string, string>> | undefined;
  /** A refusal about the row as a whole. */
  rowError: string | undefined;
}

export interface ProblemItem {
  key: string;
  text: string;
  r: number;
  c: number;
}

export interface GridSummary {
  /** Rows with something typed. */
  pending: number;
  /** Every value that stops a row from saving, in grid order. */
  problems: ProblemItem[];
}

type Listener = () => void;

const EMPTY: Readonly<Record<string, string>> = Object.freeze({});

export class GridStore {
  private couponList: readonly CouponOut[] = [];
  private index = new Map<number, number>();
  private units: SiConverter;
  private draftMap: Drafts = {};
  private cellErrors: CellErrors = {};
  private rowErrors: Record<number, string> = {};
  private activeCell = { r: 0, c: 0 };
  private rows = new Map<number, { coupon: CouponOut; units: SiConverter; state: RowState }>();
  private rowListeners = new Map<number, Set<Listener>>();
  private activeListeners = new Set<Listener>();
  private listeners = new Set<Listener>();
  private version = 0;
  private summaryCache: { version: number; value: GridSummary } | null = null;

  constructor(coupons: readonly CouponOut[], units: SiConverter, active?: { r: number; c: number }) {
    this.units = units;
    this.setCoupons(coupons);
    if (active) this.activeCell = active;
  }

  // The coupons and the units come from React (query data, the user's choice). They are set while the grid
  // renders, so they notify nobody: rows re-render then anyway, and a row's snapshot notices a new coupon
  // object or new units by itself.

  setCoupons(coupons: readonly CouponOut[]): void {
    if (coupons === this.couponList) return;
    this.couponList = coupons;
    this.index = new Map(coupons.map((c, i) => [c.id, i]));
    this.version++;
  }

  setUnits(units: SiConverter): void {
    if (units === this.units) return;
    this.units = units;
    this.version++;
  }

  get coupons(): readonly CouponOut[] {
    return this.couponList;
  }

  indexOf(couponId: number): number {
    return this.index.get(couponId) ?? -1;
  }

  /** The row's state for its coupon as given (a coupon replaced after a save gets a fresh model). */
  row(coupon: CouponOut): RowState {
    const cached = this.rows.get(coupon.id);
    if (cached && cached.coupon === coupon && cached.units === this.units) return cached.state;
    const state = this.buildRow(coupon);
    this.rows.set(coupon.id, { coupon, units: this.units, state });
    return state;
  }

  /** Every row's model, in grid order (for a save or the summary); cached rows are reused. */
  models(): RowModel[] {
    return this.couponList.map((c) => this.row(c).model);
  }

  private buildRow(coupon: CouponOut): RowState {
    const draft = this.draftMap[coupon.id];
    return {
      model: rowModel(coupon, draft, this.units, new Date().toISOString()),
      draft,
      errors: this.cellErrors[coupon.id],
      rowError: this.rowErrors[coupon.id],
    };
  }

  drafts(): Drafts {
    return this.draftMap;
  }

  draft(couponId: number, colId: string): string | undefined {
    return this.draftMap[couponId]?.[colId];
  }

  /** A typed value; it also clears the cell's refusal from the last save (it is a new value now). */
  setDraft(couponId: number, colId: string, value: string): void {
    const row = this.draftMap[couponId] ?? EMPTY;
    if (row[colId] === value) return;
    this.draftMap = { ...this.draftMap, [couponId]: { ...row, [colId]: value } };
    const errs = this.cellErrors[couponId];
    if (errs?.[colId] !== undefined) {
      const rest = { ...errs };
      delete rest[colId];
      this.cellErrors = { ...this.cellErrors, [couponId]: rest };
    }
    this.changed([couponId]);
  }

  clearDraft(couponId: number, colId: string): void {
    const row = this.draftMap[couponId];
    if (!row || !(colId in row)) return;
    const rest = { ...row };
    delete rest[colId];
    const next = { ...this.draftMap };
    if (Object.keys(rest).length === 0) delete next[couponId];
    else next[couponId] = rest;
    this.draftMap = next;
    this.changed([couponId]);
  }

  /** Replaces every draft (a paste, a restored draft, what a save leaves); only rows whose draft changed are told. */
  setDrafts(next: Drafts | ((d: Drafts) => Drafts)): void {
    const value = typeof next === 'function' ? next(this.draftMap) : next;
    if (value === this.draftMap) return;
    const touched = changedKeys(this.draftMap, value);
    this.draftMap = value;
    this.changed(touched);
  }

  /** The refusals of the last save (or none); rows whose refusals changed are told. */
  setRefusals(cells: CellErrors, rows: Record<number, string>): void {
    const touched = new Set([...changedKeys(this.cellErrors, cells), ...changedKeys(this.rowErrors, rows)]);
    this.cellErrors = cells;
    this.rowErrors = rows;
    this.changed([...touched]);
  }

  private changed(couponIds: readonly number[]): void {
    if (couponIds.length === 0) return;
    for (const id of couponIds) this.rows.delete(id);
    this.version++;
    for (const id of couponIds) for (const l of this.rowListeners.get(id) ?? []) l();
    for (const l of this.listeners) l();
  }

  active(): { r: number; c: number } {
    return this.activeCell;
  }

  /** The active column in row `r`, or -1: a row re-renders only when the active cell enters or leaves it. */
  activeColumnIn(r: number): number {
    return this.activeCell.r === r ? this.activeCell.c : -1;
  }

  setActive(r: number, c: number): void {
    if (this.activeCell.r === r && this.activeCell.c === c) return;
    this.activeCell = { r, c };
    for (const l of this.activeListeners) l();
  }

  subscribeRow(couponId: number, listener: Listener): () => void {
    let set = this.rowListeners.get(couponId);
    if (!set) this.rowListeners.set(couponId, (set = new Set()));
    set.add(listener);
    return () => {
      set.delete(listener);
      if (set.size === 0) this.rowListeners.delete(couponId);
    };
  }

  subscribeActive(listener: Listener): () => void {
    this.activeListeners.add(listener);
    return () => this.activeListeners.delete(listener);
  }

  /** Any change of drafts or refusals. */
  subscribe(listener: Listener): () => void {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  }

  /** How many rows are typed and what stops rows from saving; recomputed once per change, from cached rows. */
  summary(): GridSummary {
    if (this.summaryCache?.version === this.version) return this.summaryCache.value;
    let pending = 0;
    const problems: ProblemItem[] = [];
    this.couponList.forEach((coupon, r) => {
      // Rows with nothing typed and no refusal have nothing to say: skip them without building a model.
      if (!this.draftMap[coupon.id] && !this.cellErrors[coupon.id] && !this.rowErrors[coupon.id]) return;
      const { model, errors, rowError } = this.row(coupon);
      if (model.edited) pending++;
      ENTRY_COLUMNS.forEach((col, c) => {
        const msg = model.problems[col.id] ?? errors?.[col.id];
        if (msg) problems.push({ key: `${coupon.id}-${col.id}`, text: `${coupon.tag}, ${col.label.toLowerCase()}: ${msg}`, r, c });
      });
      if (rowError) problems.push({ key: `${coupon.id}-row`, text: `${coupon.tag}: ${rowError}`, r, c: 0 });
    });
    const value = { pending, problems };
    this.summaryCache = { version: this.version, value };
    return value;
  }
}

/** Keys (coupon ids) whose entry differs by identity between two records. */
function changedKeys(a: Record<number, unknown>, b: Record<number, unknown>): number[] {
  const out = new Set<number>();
  for (const k of Object.keys(a)) if (a[Number(k)] !== b[Number(k)]) out.add(Number(k));
  for (const k of Object.keys(b)) if (a[Number(k)] !== b[Number(k)]) out.add(Number(k));
  return [...out];
}
