import type { CheckStage, WeighingStage } from '../../../../shared/constants/records';
import { batchMeasurementsSchema, type BatchMeasurementsInput, type CouponOut } from '../../../../shared/schemas/coupons';
import { ENTRY_COLUMNS, savable, type DimensionField, type Drafts, type EntryColumn, type RowModel } from './grid-model';

/**
 * The grid's save as pure steps: which rows go, the one request they make, where a refusal lands, what the
 * status line says, and how the answer's coupons replace the rows they came from.
 */

export interface BatchPlan {
  entries: {
    couponId: number;
    weighings?: { stage: WeighingStage; massG: number; measuredAt: string }[];
    checks?: { kind: 'dimension'; stage: CheckStage; measuredAt: string; lengthMm: number; widthMm: number; thicknessMm: number }[];
  }[];
  /** For each entry, the grid columns behind each weighing and check, to put the server's errors on the right cells. */
  cells: { couponId: number; weighings: string[]; checks: string[][] }[];
}

const dimensionColumns = (stage: CheckStage) =>
  ENTRY_COLUMNS.filter((c): c is Extract<EntryColumn, { source: 'dimension' }> => c.source === 'dimension' && c.stage === stage);

/** The one request a save sends: each savable row's typed weighings and whole size sets, in SI. */
export function planBatch(rows: readonly RowModel[], measuredAt: string): BatchPlan {
  const plan: BatchPlan = { entries: [], cells: [] };
  for (const r of rows) {
    if (!savable(r)) continue;
    const weighings: NonNullable<BatchPlan['entries'][number]['weighings']> = [];
    const wCells: string[] = [];
    for (const col of ENTRY_COLUMNS) {
      const v = r.typed[col.id];
      if (col.source === 'weighing' && v !== undefined) {
        weighings.push({ stage: col.stage, massG: v, measuredAt });
        wCells.push(col.id);
      }
    }
    const checks: NonNullable<BatchPlan['entries'][number]['checks']> = [];
    const cCells: string[][] = [];
    for (const stage of ['dry', 'cured'] as const) {
      const cols = dimensionColumns(stage);
      const v = Object.fromEntries(cols.map((c) => [c.field, r.typed[c.id]])) as Partial<Record<DimensionField, number>>;
      if (v.lengthMm === undefined || v.widthMm === undefined || v.thicknessMm === undefined) continue;
      checks.push({ kind: 'dimension', stage, measuredAt, lengthMm: v.lengthMm, widthMm: v.widthMm, thicknessMm: v.thicknessMm });
      cCells.push(cols.map((c) => c.id));
    }
    if (weighings.length === 0 && checks.length === 0) continue;
    plan.entries.push({ couponId: r.coupon.id, ...(weighings.length ? { weighings } : {}), ...(checks.length ? { checks } : {}) });
    plan.cells.push({ couponId: r.coupon.id, weighings: wCells, checks: cCells });
  }
  return plan;
}

/**
 * Where an error the server (or the contract) names lands: `entries.<i>.weighings.<j>.<field>` or
 * `entries.<i>.checks.<j>.<field>` → the coupon and its cells; `entries.<i>` → the coupon's row; anything
 * else → null (it is about the whole request).
 */
export function locateError(path: string, plan: BatchPlan): { couponId: number; cells: string[] } | null {
  const m = /^entries\.(\d+)(?:\.(weighings|checks)\.(\d+)(?:\.(\w+))?)?/.exec(path);
  if (!m) return null;
  const entry = plan.cells[Number(m[1])];
  if (!entry) return null;
  if (!m[2]) return { couponId: entry.couponId, cells: [] };
  const j = Number(m[3]);
  if (m[2] === 'weighings') {
    const id = entry.weighings[j];
    return { couponId: entry.couponId, cells: id ? [id] : [] };
  }
  const set = entry.checks[j] ?? [];
  const field = m[4];
  const one = set.find((id) => field && id.endsWith(field.replace(/Mm$/, '')));
  return { couponId: entry.couponId, cells: one ? [one] : set };
}

export type CellErrors = Record<number, Record<string, string>>;
export interface Refusals {
  /** By coupon, by column id. */
  cells: CellErrors;
  /** By coupon: about the row as a whole. */
  rows: Record<number, string>;
  /** About the whole request (e.g. too many rows at once). */
  general: string | null;
}

export const noRefusals = (): Refusals => ({ cells: {}, rows: {}, general: null });

/** Errors named by path (the contract's issues, or the server's `fieldErrors`) put on their cells and rows. */
export function refusalsFrom(errors: readonly (readonly [path: string, message: string])[], plan: BatchPlan): Refusals {
  const out = noRefusals();
  for (const [path, message] of errors) {
    const at = locateError(path, plan);
    if (!at) {
      out.general ??= message;
      continue;
    }
    if (at.cells.length === 0) out.rows[at.couponId] = message;
    for (const id of at.cells) out.cells[at.couponId] = { ...out.cells[at.couponId], [id]: message };
  }
  return out;
}

export function mergeRefusals(a: Refusals, b: Refusals): Refusals {
  const cells: CellErrors = { ...a.cells };
  for (const [id, row] of Object.entries(b.cells)) cells[Number(id)] = { ...cells[Number(id)], ...row };
  return { cells, rows: { ...a.rows, ...b.rows }, general: a.general ?? b.general };
}

export interface PreparedSave {
  /** The request to send, or null when nothing can go. */
  body: BatchMeasurementsInput | null;
  /** The entries that go (same order as `body.entries`). */
  plan: BatchPlan;
  /** Values the contract refuses (outside its bounds), put on their cells; their rows stay back. */
  refused: Refusals;
  /** Rows held back: typed with a problem, or refused by the contract. */
  held: number;
}

/**
 * Plans a save from the rows as they stand: rows with a problem stay back, values outside the contract's
 * bounds (e.g. 3000 mm) keep their row back, and the other rows still go.
 */
export function prepareSave(rows: readonly RowModel[], measuredAt: string): PreparedSave {
  const blocked = rows.filter((m) => m.edited && !savable(m)).length;
  let plan = planBatch(rows, measuredAt);
  if (plan.entries.length === 0) return { body: null, plan, refused: noRefusals(), held: blocked };
  let parsed = batchMeasurementsSchema.safeParse({ entries: plan.entries });
  if (parsed.success) return { body: parsed.data, plan, refused: noRefusals(), held: blocked };
  const refused = refusalsFrom(
    parsed.error.issues.map((i) => [i.path.join('.'), i.message] as const),
    plan,
  );
  const bad = new Set(parsed.error.issues.map((i) => i.path[1]).filter((x): x is number => typeof x === 'number'));
  plan = { entries: plan.entries.filter((_, i) => !bad.has(i)), cells: plan.cells.filter((_, i) => !bad.has(i)) };
  parsed = batchMeasurementsSchema.safeParse({ entries: plan.entries });
  const held = blocked + bad.size;
  if (!parsed.success || plan.entries.length === 0) {
    // Whatever is still refused is about the whole request (too many rows at once).
    const general = parsed.success ? null : (parsed.error.issues[0]?.message ?? null);
    return { body: null, plan, refused: { ...refused, general: refused.general ?? general }, held };
  }
  return { body: parsed.data, plan, refused, held };
}

const plural = (n: number, one: string, many: string) => (n === 1 ? one : many);

/** The status line when nothing went. */
export function nothingSavedText(prepared: Pick<PreparedSave, 'held' | 'refused'>): { text: string; bad: boolean } {
  if (prepared.refused.general) return { text: `Nothing saved: ${prepared.refused.general}.`, bad: true };
  const { held } = prepared;
  if (held > 0) return { text: `Nothing saved: ${held} ${plural(held, 'row has', 'rows have')} problems, marked in the Check column.`, bad: true };
  return { text: 'Nothing to save: no new values typed.', bad: false };
}

export interface SaveAnswer {
  written: { weighings: number; checks: number };
  coupons: CouponOut[];
  warnings: { couponId: number }[];
}

/** The status line after a save went through. */
export function savedText(answer: SaveAnswer, entries: number, held: number): { text: string; bad: boolean } {
  const { weighings, checks } = answer.written;
  const parts = [
    `Saved ${weighings} ${plural(weighings, 'weighing', 'weighings')} and ${checks} size ${plural(checks, 'set', 'sets')} for ${entries} ${plural(entries, 'coupon', 'coupons')}.`,
  ];
  if (held) parts.push(`${held} ${plural(held, 'row', 'rows')} with problems not saved.`);
  const warned = new Set(answer.warnings.map((w) => w.couponId)).size;
  if (warned) parts.push(`${warned} ${plural(warned, 'coupon has', 'coupons have')} a warning in the Check column.`);
  return { text: parts.join(' '), bad: held > 0 };
}

/** The server's refusal in the status line, without the paths it uses to name the cells (those get the message). */
export function refusedText(message: string): string {
  return `Nothing saved: ${message.replace(/entries\.\d+(\.\w+\.\d+)?(\.\w+)?:\s*/g, '')}`;
}

/** The saved coupons from the answer put in place of their rows; other rows keep their identity. */
export function replaceSaved(rows: readonly CouponOut[], saved: readonly CouponOut[]): CouponOut[] {
  const byId = new Map(saved.map((c) => [c.id, c]));
  return rows.map((c) => byId.get(c.id) ?? c);
}

/**
 * The drafts left after a save: the saved rows' typed values are gone (they are readings now); a row that was
 * typed on while the request was out keeps what changed since.
 */
export function dropSaved(drafts: Drafts, sent: Drafts, plan: Pick<BatchPlan, 'entries'>): Drafts {
  const next: Drafts = { ...drafts };
  for (const e of plan.entries) {
    const now = next[e.couponId];
    const then = sent[e.couponId];
    if (!now) continue;
    const kept = Object.fromEntries(Object.entries(now).filter(([col, v]) => v !== then?.[col] && v !== ''));
    if (Object.keys(kept).length === 0) delete next[e.couponId];
    else next[e.couponId] = kept;
  }
  return next;
}
