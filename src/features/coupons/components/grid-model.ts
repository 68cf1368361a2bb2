import type { CheckStage, WeighingStage } from '../../../../shared/constants/records';
import { couponMetrics, type CheckReading, type CouponMetrics, type WeighingReading } from '../../../../shared/coupons/metrics';
import { checkProblems, weighingProblem } from '../../../../shared/coupons/validate';
import type { CouponOut } from '../../../../shared/schemas/coupons';
import type { Quantity } from '../../../../shared/units';
import { parseNumber } from '../../../lib/forms/parse-number';

/** An editable column of the entry grid: a weighing at a stage, or one dimension of the stage's set. */
export type EntryColumn =
  | { id: string; label: string; quantity: Quantity; source: 'weighing'; stage: WeighingStage; treatedOnly: boolean }
  | { id: string; label: string; quantity: Quantity; source: 'dimension'; stage: CheckStage; field: DimensionField; treatedOnly: boolean };

export type DimensionField = 'lengthMm' | 'widthMm' | 'thicknessMm';
const DIMENSIONS: DimensionField[] = ['lengthMm', 'widthMm', 'thicknessMm'];
const DIMENSION_WORD: Record<DimensionField, string> = { lengthMm: 'length', widthMm: 'width', thicknessMm: 'thickness' };

function dims(stage: CheckStage, prefix: string, treatedOnly: boolean): EntryColumn[] {
  return DIMENSIONS.map((field) => ({
    id: `${stage}-${DIMENSION_WORD[field]}`,
    label: `${prefix} ${DIMENSION_WORD[field]}`,
    quantity: 'length' as const,
    source: 'dimension' as const,
    stage,
    field,
    treatedOnly,
  }));
}

/** In the order a coupon is measured at the bench: dry mass and size, the soaked mass, then cured mass and size. */
export const ENTRY_COLUMNS: EntryColumn[] = [
  { id: 'dry', label: 'Dry mass', quantity: 'mass', source: 'weighing', stage: 'dry', treatedOnly: false },
  ...dims('dry', 'Dry', false),
  { id: 'soaked', label: 'Soaked mass', quantity: 'mass', source: 'weighing', stage: 'soaked', treatedOnly: true },
  { id: 'cured', label: 'Cured mass', quantity: 'mass', source: 'weighing', stage: 'cured', treatedOnly: true },
  // Controls are never cured, so they have no cured size either.
  ...dims('cured', 'Cured', true),
];

export const columnIndexOf = (id: string | null): number => {
  const i = ENTRY_COLUMNS.findIndex((c) => c.id === id);
  return i < 0 ? 0 : i;
};

export type Drafts = Record<number, Record<string, string>>;

export interface SiConverter {
  fromDisplay: (v: number, q: Quantity) => number;
  toDisplay: (v: number, q: Quantity) => number;
}

/** What a cell shows when nothing is typed: the stored value, if any, in display units. */
export function storedValue(coupon: CouponOut, col: EntryColumn): number | null {
  if (col.source === 'weighing') {
    const w = coupon.weighings.filter((x) => x.stage === col.stage).sort((a, b) => b.measuredAt.localeCompare(a.measuredAt))[0];
    return w ? w.massG : null;
  }
  const c = coupon.checks.filter((x) => x.kind === 'dimension' && x.stage === col.stage).sort((a, b) => b.measuredAt.localeCompare(a.measuredAt))[0];
  return c ? c[col.field] : null;
}

/** A stage that already has its reading is corrected on the coupon's page, with a reason, not overtyped here. */
export function isLocked(coupon: CouponOut, col: EntryColumn): 'stored' | 'control' | null {
  if (col.treatedOnly && coupon.role === 'control') return 'control';
  if (col.source === 'weighing') return coupon.weighings.some((w) => w.stage === col.stage) ? 'stored' : null;
  return coupon.checks.some((c) => c.kind === 'dimension' && c.stage === col.stage) ? 'stored' : null;
}

/** A typed number, read by the one parser of the client (`parseNumber`: decimal point or comma). NaN when it is not a number. */
export function parseTyped(text: string): number | null {
  return parseNumber(text);
}

export interface RowModel {
  coupon: CouponOut;
  metrics: CouponMetrics;
  /** Typed values in SI, by column id, only for cells with something typed. */
  typed: Record<string, number>;
  /** Impossible or unreadable values, by column id: shown on the cell, and the row is not saved. */
  problems: Record<string, string>;
  /** Typed but not yet savable (a size half typed); said in the row, not flagged as an error. */
  incomplete: string[];
  edited: boolean;
}

/**
 * The row as it would be if the typed values were saved: its readings with the typed ones added, the
 * computed metrics from the shared functions, and every reason a typed value cannot be saved.
 */
export function rowModel(coupon: CouponOut, draft: Record<string, string> | undefined, units: SiConverter, now: string): RowModel {
  const typed: Record<string, number> = {};
  const problems: Record<string, string> = {};
  const incomplete: string[] = [];
  for (const col of ENTRY_COLUMNS) {
    const text = draft?.[col.id];
    if (text === undefined || text.trim() === '' || isLocked(coupon, col)) continue;
    const n = parseTyped(text);
    if (n === null) continue;
    if (Number.isNaN(n)) problems[col.id] = `“${text.trim()}” is not a number`;
    else typed[col.id] = units.fromDisplay(n, col.quantity);
  }

  const weighings: WeighingReading[] = coupon.weighings.map((w) => ({ stage: w.stage, massG: w.massG, measuredAt: w.measuredAt }));
  const checks: CheckReading[] = coupon.checks.map((c) => ({ ...c }));
  const storedMass = (stage: 'dry' | 'soaked' | 'cured') => storedValue(coupon, ENTRY_COLUMNS.find((c) => c.id === stage) as EntryColumn);
  const masses = { dry: storedMass('dry'), soaked: storedMass('soaked'), cured: storedMass('cured') };
  for (const stage of ['dry', 'soaked', 'cured'] as const) if (typed[stage] !== undefined) masses[stage] = typed[stage] as number;

  for (const col of ENTRY_COLUMNS) {
    if (col.source !== 'weighing' || typed[col.id] === undefined) continue;
    const m = typed[col.id] as number;
    const others = { ...masses, [col.stage]: null };
    const p = weighingProblem(col.stage, m, others);
    // An impossible value is left out of the computed columns: a number from it would mean nothing.
    if (p) problems[col.id] = p.message;
    else weighings.push({ stage: col.stage, massG: m, measuredAt: now });
  }

  for (const stage of ['dry', 'cured'] as const) {
    const cols = ENTRY_COLUMNS.filter((c): c is Extract<EntryColumn, { source: 'dimension' }> => c.source === 'dimension' && c.stage === stage);
    const given = cols.filter((c) => typed[c.id] !== undefined || problems[c.id] !== undefined);
    if (given.length === 0) continue;
    const values: Partial<Record<DimensionField, number>> = {};
    for (const c of cols) if (typed[c.id] !== undefined) values[c.field] = typed[c.id];
    for (const p of checkProblems({ kind: 'dimension', ...values })) {
      const col = cols.find((c) => c.field === p.field);
      if (col) problems[col.id] = p.message;
    }
    // The three make one set: a size half typed is not saved until it is whole.
    if (cols.some((c) => typed[c.id] === undefined && problems[c.id] === undefined)) incomplete.push(`Give the ${stage} length, width and thickness together`);
    const usable = Object.fromEntries(cols.filter((c) => problems[c.id] === undefined && typed[c.id] !== undefined).map((c) => [c.field, typed[c.id]]));
    checks.push({ kind: 'dimension', stage, measuredAt: now, ...usable });
  }

  const metrics = couponMetrics({ role: coupon.role, weighings, checks, resin: coupon.resin ? { curedDensityGcm3: coupon.resin.curedDensityGcm3 } : null });
  return { coupon, metrics, typed, problems, incomplete, edited: Object.keys(typed).length > 0 || Object.keys(problems).length > 0 };
}

/** A stored value as the cell shows it: in display units, to 4 decimals at most, so nothing a balance gave is hidden. */
export function showStored(value: number | null, col: EntryColumn, units: SiConverter): string {
  if (value === null) return '';
  return String(Number(units.toDisplay(value, col.quantity).toFixed(4)));
}

export interface BatchPlan {
  entries: {
    couponId: number;
    weighings?: { stage: WeighingStage; massG: number; measuredAt: string }[];
    checks?: { kind: 'dimension'; stage: CheckStage; measuredAt: string; lengthMm: number; widthMm: number; thicknessMm: number }[];
  }[];
  /** For each entry, the grid columns behind each weighing and check, to put the server's errors on the right cells. */
  cells: { couponId: number; weighings: string[]; checks: string[][] }[];
}

/** The one request a save sends: each savable row's typed weighings and whole size sets. */
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
      const cols = ENTRY_COLUMNS.filter((c): c is Extract<EntryColumn, { source: 'dimension' }> => c.source === 'dimension' && c.stage === stage);
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

export function savable(r: RowModel): boolean {
  return r.edited && Object.keys(r.problems).length === 0 && r.incomplete.length === 0 && Object.keys(r.typed).length > 0;
}

/**
 * Where an error the server (or the contract) names lands: `entries.<i>.weighings.<j>.<field>` or
 * `entries.<i>.checks.<j>.<field>` → the coupon and its cells; anything else → the coupon's row.
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
