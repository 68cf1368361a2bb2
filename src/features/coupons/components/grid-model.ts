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

export function savable(r: RowModel): boolean {
  return r.edited && Object.keys(r.problems).length === 0 && r.incomplete.length === 0 && Object.keys(r.typed).length > 0;
}
