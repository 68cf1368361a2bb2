import type Database from 'better-sqlite3';
import { getTableColumns } from 'drizzle-orm';
import type { Db } from '../db/client';
import { checks, weighings } from '../db/schema/coupons';
import { writeAudit } from '../db/audit';
import { lastAuditId } from '../db/audit-memo';
import { AppError, Conflict, NotFound, Unprocessable, ValidationFailed } from '../http/errors';
import type { MeasurementSource, WeighingStage } from '../../shared/constants/records';
import type { CheckInput, CorrectCheckInput, CorrectWeighingInput, WeighingInput } from '../../shared/schemas/coupons';
import { massAt, type WeighingReading } from '../../shared/coupons/metrics';
import { checkProblems, weighingProblem, type MeasurementProblem } from '../../shared/coupons/validate';
import {
  checkById,
  currentWeighingsOf,
  insertCheck,
  insertWeighing,
  markCheck,
  markWeighing,
  weighingById,
  type CheckRow,
  type WeighingRow,
} from './readings.repo';
import { mayHaveReadings, client, prepared, preparedRaw, refreshResults, refreshResultsInSteps } from './results';
import { runSteps, type Steps } from './steps';

const INSERT_WEIGHING = 'insert into weighings (coupon_id, stage, mass_g, measured_at, import_id, source, created_by) values (?, ?, ?, ?, ?, ?, ?)';
/** Weighings inserted per statement on the bulk path (4 bound values each, far below SQLite's 32,766 variables). */
const INSERT_ROWS = 50;
/**
 * The bulk path's INSERT of `rows` weighings of one import by one person: the import, its source and the
 * person are the same in every row, so they are written into the statement (integers of our own, never
 * text from a user) and only coupon, stage, mass and time are bound; binding 350 values per statement
 * rather than 200 cost ~15 % of the insert.
 */
function insertImported(importId: number, actorId: number, rows: number) {
  if (!Number.isSafeInteger(importId) || !Number.isSafeInteger(actorId)) throw new Error('An import and its actor are named by integer ids');
  const row = `(?, ?, ?, ?, ${importId}, 'import:${importId}', ${actorId})`;
  return `insert into weighings (coupon_id, stage, mass_g, measured_at, import_id, source, created_by) values ${Array(rows).fill(row).join(', ')}`;
}
const INSERT_CHECK =
  'insert into checks (coupon_id, kind, stage, measured_at, length_mm, width_mm, thickness_mm, volume_cm3, hardness_value, hardness_scale, moisture_pct, method, import_id, source, created_by) values (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)';
/** The stored row back, named as drizzle names it (WeighingRow, CheckRow): every column is plain, none needs mapping. */
const returning = (table: typeof weighings | typeof checks) =>
  ` returning ${Object.entries(getTableColumns(table))
    .map(([key, col]) => `${col.name} as "${key}"`)
    .join(', ')}`;
const INSERT_WEIGHING_RETURNING = INSERT_WEIGHING + returning(weighings);
const INSERT_CHECK_RETURNING = INSERT_CHECK + returning(checks);

/** See `bulkAdd`. `slice`: entries written per step of `bulkAddInSteps` (all at once by default). */
export interface BulkAddOptions {
  reason?: string;
  skipRefused?: boolean;
  audit?: 'per-coupon' | 'per-source';
  judgedAt?: number;
  slice?: number;
}
/** See `bulkDelete`. `slice`: ids soft-deleted per step of `bulkDeleteInSteps` (all at once by default). */
export interface BulkDeleteOptions {
  slice?: number;
  /**
   * `{ importId }` (an import's undo): ONE `delete-readings` entry on the import — when, how many readings
   * of how many coupons, which stages, and the reason — instead of one per coupon with its values before.
   * The rows stay with their values, their import id and the time they were deleted (soft delete), so what
   * the undo took away, and what it held, stays answerable from the rows; at 100,000 coupons the per-coupon
   * entries were about 40 % of the undo's CPU and most of the pages it wrote.
   */
  audit?: 'per-coupon' | { importId: number };
}
export interface BulkAddResult {
  written: { weighings: number; checks: number };
  couponIds: number[];
  refused: ReadingProblem[];
  judgedAgain: boolean;
}

/** Who is writing: only the id is stored (created_by, audit actor). */
export interface Actor {
  id: number;
}

/** The readings of one coupon in a batch or bulk write. */
export interface MeasurementEntry {
  couponId: number;
  weighings?: readonly WeighingInput[];
  checks?: readonly CheckInput[];
}

/** One refused reading: which entry, which list and item, which field, and why. */
export interface ReadingProblem {
  entry: number;
  list: 'weighings' | 'checks' | null;
  index: number | null;
  field: string;
  message: string;
  code: 'conflict' | 'unprocessable';
}

/** Fields each check kind may carry; anything else in a correction is refused. */
const CHECK_FIELDS = {
  dimension: ['lengthMm', 'widthMm', 'thicknessMm', 'volumeCm3'],
  hardness: ['hardnessValue', 'hardnessScale'],
  moisture: ['moisturePct'],
} as const;

const SINGLE_STAGES: readonly WeighingStage[] = ['dry', 'soaked', 'cured', 'wet-test'];
const NO_READINGS: readonly never[] = [];

export function importIdOf(source: MeasurementSource): number | null {
  return source.startsWith('import:') ? Number(source.slice('import:'.length)) : null;
}

const NO_MASSES = Object.freeze({ dry: null, soaked: null, cured: null });

function masses(ws: readonly WeighingReading[]) {
  if (ws.length === 0) return NO_MASSES;
  return { dry: massAt(ws, 'dry'), soaked: massAt(ws, 'soaked'), cured: massAt(ws, 'cured') };
}

function problemError(prefix: string, problems: MeasurementProblem[]): Unprocessable {
  const fieldErrors: Record<string, string[]> = {};
  for (const p of problems) (fieldErrors[`${prefix}${p.field}`] ??= []).push(p.message);
  const first = problems[0] as MeasurementProblem;
  return new Unprocessable(prefix ? `${prefix.replace(/\.$/, '')}: ${first.message}` : first.message, fieldErrors);
}

/** How a problem's field is named in an answer: `massG` alone, or `entries.3.weighings.0.massG` in a batch. */
type Prefixer = (p: Pick<ReadingProblem, 'entry' | 'list' | 'index'>) => string;
const batchPrefix: Prefixer = (p) => (p.list === null ? `entries.${p.entry}.` : `entries.${p.entry}.${p.list}.${p.index}.`);
const singlePrefix: Prefixer = () => '';

/** One AppError per refused reading (its problems together), as the grid and the coupon page expect. */
function errorsOf(problems: readonly ReadingProblem[], prefixOf: Prefixer): AppError[] {
  const byReading = new Map<string, ReadingProblem[]>();
  for (const p of problems) {
    const key = `${p.entry}|${p.list}|${p.index}`;
    const list = byReading.get(key);
    if (list) list.push(p);
    else byReading.set(key, [p]);
  }
  return [...byReading.values()].map((ps) => {
    const first = ps[0] as ReadingProblem;
    const prefix = prefixOf(first);
    if (first.code === 'conflict') {
      return new Conflict(prefix ? `${prefix.replace(/\.$/, '')}: ${first.message}` : first.message, { [`${prefix}${first.field}`]: [first.message] });
    }
    return problemError(prefix, ps);
  });
}

/** All refusals as one error: the only one as it is, several counted with the first named. */
export function combinedError(failures: AppError[]): AppError {
  const first = failures[0] as AppError;
  if (failures.length === 1) return first;
  const fieldErrors: Record<string, string[]> = {};
  for (const f of failures) for (const [k, v] of Object.entries(f.fieldErrors ?? {})) (fieldErrors[k] ??= []).push(...v);
  return new AppError(first.code, `${failures.length} readings have problems, nothing was saved; the first: ${first.message}`, fieldErrors);
}

/**
 * An audit insert with the actor's name and e-mail filled from one lookup: the table's trigger would
 * otherwise run an UPDATE per entry to fill them (it only acts when they are missing), which cost more
 * than the insert itself at 100,000 entries.
 */
function auditWriter(tx: Db, actor: Actor, action: string, entity: 'coupon' | 'weighing' | 'check' | 'import' = 'coupon') {
  const who = prepared(tx, 'select name, email from users where id = ?').get(actor.id) as { name: string; email: string } | undefined;
  const ins = prepared(
    tx,
    'insert into audit_log (actor_id, created_by, actor_name, actor_email, action, entity, entity_id, before, after, reason) values (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)',
  );
  return (entityId: number, before: unknown, after: unknown, reason: string | null) =>
    ins.run(
      actor.id,
      actor.id,
      who?.name ?? null,
      who?.email ?? null,
      action,
      entity,
      String(entityId),
      before === null ? null : JSON.stringify(before),
      JSON.stringify(after),
      reason,
    );
}

/** Widens [low, high] to take in `id`. */
function stretch(range: number[], id: number) {
  if (id < (range[0] as number)) range[0] = id;
  if (id > (range[1] as number)) range[1] = id;
}

/** Column names as drizzle names them, each converted once (an undo converts 100,000 rows' columns). */
const camelNames = new Map<string, string>();
const camelName = (k: string) => {
  let name = camelNames.get(k);
  if (name === undefined) {
    name = k.replace(/_([a-z0-9])/g, (_, c: string) => c.toUpperCase());
    camelNames.set(k, name);
  }
  return name;
};

/** A raw row with its columns named as drizzle names them (mass_g → massG), for the audit entry. */
function camel(row: object): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const k in row) out[camelName(k)] = (row as Record<string, unknown>)[k];
  return out;
}

/** What the rules need of a coupon besides its readings. */
export interface KnownCoupon {
  tag: string;
  role: 'treated' | 'control';
}

/**
 * A coupon's stored state for the rules. Most coupons of a big write have no readings yet, so the lists
 * are shared empty ones until a reading is added (`addWeighingTo`, `addDimensionStage`): an import judges
 * 100,000 coupons, and a list and a Set each were most of what its judging allocated.
 */
interface CouponState {
  tag: string;
  role: 'treated' | 'control';
  weighings: readonly WeighingReading[];
  dimensionStages: ReadonlySet<string>;
}
const NO_WEIGHINGS: readonly WeighingReading[] = Object.freeze([]);
const NO_STAGES: ReadonlySet<string> = new Set();

const stateOf = (tag: string, role: 'treated' | 'control'): CouponState => ({ tag, role, weighings: NO_WEIGHINGS, dimensionStages: NO_STAGES });

function addWeighingTo(s: CouponState, w: WeighingReading) {
  if (s.weighings === NO_WEIGHINGS) s.weighings = [w];
  else (s.weighings as WeighingReading[]).push(w);
}

function addDimensionStage(s: CouponState, stage: string) {
  if (s.dimensionStages === NO_STAGES) s.dimensionStages = new Set([stage]);
  else (s.dimensionStages as Set<string>).add(stage);
}

/** The stored state the rules need, for every coupon of the entries, in three queries binding one JSON array. */
function loadStates(tx: Db, couponIds: number[], into = new Map<number, CouponState>(), known?: ReadonlyMap<number, KnownCoupon>): Map<number, CouponState> {
  const unique = couponIds.length === 1 ? couponIds : [...new Set(couponIds)];
  const ids = JSON.stringify(unique);
  const states = into;
  let unknown = unique;
  if (known) {
    unknown = [];
    for (const id of unique) {
      const k = known.get(id);
      if (k) states.set(id, stateOf(k.tag, k.role));
      else unknown.push(id);
    }
  }
  // Rows as arrays (preparedRaw): an import asks about 100,000 coupons, and naming every column of every
  // row cost more than the queries.
  if (unknown.length) {
    const rows = preparedRaw(tx, 'select id, tag, role from coupons where id in (select value from json_each(?))').all(
      unknown === unique ? ids : JSON.stringify(unknown),
    ) as [number, string, 'treated' | 'control'][];
    for (const r of rows) states.set(r[0], stateOf(r[1], r[2]));
  }
  // Each read is skipped when no coupon in the range of these ids has a current reading (mayHaveReadings).
  const readIfAny = (table: 'weighings' | 'checks', sql: string) => (mayHaveReadings(tx, table, unique) ? preparedRaw(tx, sql).all(ids) : []);
  const ws = readIfAny(
    'weighings',
    'select coupon_id, stage, mass_g, measured_at from weighings where coupon_id in (select value from json_each(?)) and superseded_by is null and deleted_at is null order by measured_at, id',
  ) as [number, WeighingStage, number, string][];
  for (const w of ws) {
    const st = states.get(w[0]);
    if (st) addWeighingTo(st, { stage: w[1], massG: w[2], measuredAt: w[3] });
  }
  const dims = readIfAny(
    'checks',
    "select coupon_id, stage from checks where coupon_id in (select value from json_each(?)) and kind = 'dimension' and superseded_by is null and deleted_at is null",
  ) as [number, string][];
  for (const d of dims) {
    const st = states.get(d[0]);
    if (st) addDimensionStage(st, d[1]);
  }
  return states;
}

/** loadStates for many coupons, a slice per step (each slice's queries bind one JSON array of its ids). */
function* loadStatesInSteps(tx: Db, couponIds: number[], slice: number): Steps<Map<number, CouponState>> {
  const unique = [...new Set(couponIds)];
  const states = new Map<number, CouponState>();
  for (let from = 0; from < unique.length; from += slice) {
    loadStates(tx, unique.slice(from, from + slice), states);
    if (from + slice < unique.length) yield (from + slice) / unique.length;
  }
  return states;
}

/** Where a refused weighing sits in the entries. */
const weighingAt = (entry: number, index: number) => ({ entry, list: 'weighings' as const, index });

/**
 * The write rules of a new reading, checked in memory against the stored readings and the earlier
 * readings of the same write (so a batch behaves as if its readings were added one by one):
 * controls are never soaked or cured; one current dry, soaked, cured and wet-test weighing and one set
 * of dimensions per stage; soaked and cured never below dry (and dry never above them); no
 * non-positive mass, out-of-range moisture or Shore D. Answers the problems; `states` is advanced by
 * every reading that passes.
 */
function validate(entries: readonly MeasurementEntry[], states: Map<number, CouponState>): ReadingProblem[] {
  const problems: ReadingProblem[] = [];
  // Plain loops, no closure per entry (an import judges 100,000 of them).
  for (let i = 0; i < entries.length; i++) {
    const e = entries[i] as MeasurementEntry;
    const s = states.get(e.couponId);
    if (!s) {
      problems.push({ entry: i, list: null, index: null, field: 'couponId', message: `No coupon with id ${e.couponId}`, code: 'unprocessable' });
      continue;
    }
    const ws = e.weighings ?? NO_READINGS;
    for (let j = 0; j < ws.length; j++) {
      const w = ws[j] as WeighingInput;
      if (s.role === 'control' && (w.stage === 'soaked' || w.stage === 'cured')) {
        problems.push({
          ...weighingAt(i, j),
          field: 'stage',
          code: 'unprocessable',
          message: `${s.tag} is a control: it is never soaked in resin or cured, so it has no ${w.stage} weighing`,
        });
        continue;
      }
      if (SINGLE_STAGES.includes(w.stage)) {
        const dup = s.weighings.length ? s.weighings.find((x) => x.stage === w.stage) : undefined;
        if (dup) {
          problems.push({
            ...weighingAt(i, j),
            field: 'stage',
            code: 'conflict',
            message: `${s.tag} already has a ${w.stage} weighing (${dup.massG} g); correct that one, with a reason, instead of adding another`,
          });
          continue;
        }
      }
      const p = weighingProblem(w.stage, w.massG, masses(s.weighings));
      if (p) {
        problems.push({ ...weighingAt(i, j), ...p, code: 'unprocessable' });
        continue;
      }
      addWeighingTo(s, { stage: w.stage, massG: w.massG, measuredAt: w.measuredAt });
    }
    const cs = e.checks ?? NO_READINGS;
    for (let j = 0; j < cs.length; j++) {
      const k = cs[j] as CheckInput;
      const at = { entry: i, list: 'checks' as const, index: j };
      const ps = checkProblems(k);
      if (ps.length) {
        for (const p of ps) problems.push({ ...at, ...p, code: 'unprocessable' });
        continue;
      }
      if (k.kind === 'dimension') {
        if (s.dimensionStages.has(k.stage)) {
          problems.push({
            ...at,
            field: 'stage',
            code: 'conflict',
            message: `${s.tag} already has ${k.stage} dimensions; correct those, with a reason, instead of adding another set`,
          });
          continue;
        }
        addDimensionStage(s, k.stage);
      }
    }
  }
  return problems;
}

/** The bound values of INSERT_CHECK, in its column order; a field that does not belong to the check's kind is stored null. */
function checkParams(couponId: number, k: CheckInput, source: MeasurementSource, actorId: number) {
  return [
    couponId,
    k.kind,
    k.stage,
    k.measuredAt,
    k.kind === 'dimension' ? (k.lengthMm ?? null) : null,
    k.kind === 'dimension' ? (k.widthMm ?? null) : null,
    k.kind === 'dimension' ? (k.thicknessMm ?? null) : null,
    k.kind === 'dimension' ? (k.volumeCm3 ?? null) : null,
    k.kind === 'hardness' ? k.hardnessValue : null,
    k.kind === 'hardness' ? k.hardnessScale : null,
    k.kind === 'moisture' ? k.moisturePct : null,
    k.method ?? null,
    importIdOf(source),
    source,
    actorId,
  ] as const;
}

function requireCurrent<R extends { supersededBy: number | null; deletedAt: string | null }>(row: R | undefined, what: string): R {
  if (!row) throw new NotFound(what);
  if (row.deletedAt !== null) throw new Conflict(`This ${what.toLowerCase()} was deleted; it cannot be changed`);
  if (row.supersededBy !== null) throw new Conflict(`This ${what.toLowerCase()} was already corrected; correct the current one (id ${row.supersededBy})`);
  return row;
}

/**
 * The one place where a measurement is written. Every function runs inside the caller's transaction
 * (`db.transaction((tx) => …)`), applies the write rules, writes the audit entry and refreshes the
 * coupon's row of coupon_results in that same transaction. Features (coupons, runs, imports) call it;
 * none writes weighings or checks itself.
 */
export function createMeasurements(deps: { now: () => Date }) {
  /** Validates and writes entries row by row with an audit entry per reading; answers the rows. */
  function writeRows(tx: Db, actor: Actor, source: MeasurementSource, entries: readonly MeasurementEntry[], prefixOf: Prefixer) {
    const states = loadStates(
      tx,
      entries.map((e) => e.couponId),
    );
    const problems = validate(entries, states);
    if (problems.length) throw combinedError(errorsOf(problems, prefixOf));
    const weighingRows: WeighingRow[] = [];
    const checkRows: CheckRow[] = [];
    const insW = prepared(tx, INSERT_WEIGHING_RETURNING);
    const insC = prepared(tx, INSERT_CHECK_RETURNING);
    const auditW = auditWriter(tx, actor, 'create', 'weighing');
    const auditC = auditWriter(tx, actor, 'create', 'check');
    const importId = importIdOf(source);
    for (const e of entries) {
      for (const w of e.weighings ?? []) {
        const row = insW.get(e.couponId, w.stage, w.massG, w.measuredAt, importId, source, actor.id) as WeighingRow;
        auditW(row.id, null, row, null);
        weighingRows.push(row);
      }
      for (const k of e.checks ?? []) {
        const row = insC.get(...checkParams(e.couponId, k, source, actor.id)) as CheckRow;
        auditC(row.id, null, row, null);
        checkRows.push(row);
      }
    }
    const couponIds = [...new Set(entries.map((e) => e.couponId))];
    refreshResults(tx, couponIds);
    return { weighings: weighingRows, checks: checkRows, couponIds };
  }

  function addWeighing(tx: Db, actor: Actor, source: MeasurementSource, couponId: number, input: WeighingInput): WeighingRow {
    return writeRows(tx, actor, source, [{ couponId, weighings: [input] }], singlePrefix).weighings[0] as WeighingRow;
  }

  function addCheck(tx: Db, actor: Actor, source: MeasurementSource, couponId: number, input: CheckInput): CheckRow {
    return writeRows(tx, actor, source, [{ couponId, checks: [input] }], singlePrefix).checks[0] as CheckRow;
  }

  /**
   * The entry grid's save: every reading is checked before anything is written, so one answer names
   * all the bad cells as `entries.<i>.<list>.<j>.<field>`; nothing is written when any fails.
   */
  function batch(tx: Db, actor: Actor, source: MeasurementSource, entries: readonly MeasurementEntry[]) {
    return writeRows(tx, actor, source, entries, batchPrefix);
  }

  /**
   * The records' change counter (the highest audit id): read it BEFORE `checkBulk` and hand it to
   * `bulkAdd` as `judgedAt`, which then skips judging again when nothing changed in between.
   */
  function changeCounter(tx: Db): number {
    return lastAuditId(tx);
  }

  /** Problems a bulk write would refuse, without writing anything (an import's preview). */
  /**
   * `known`: the tag and role of coupons the caller has just read (an import matched its file's tags to
   * them), so they are not read again. The caller must have read the change counter (`changeCounter`)
   * BEFORE reading them, so that a coupon changed since shows in the counter when the write comes.
   */
  function checkBulk(tx: Db, entries: readonly MeasurementEntry[], known?: ReadonlyMap<number, KnownCoupon>): ReadingProblem[] {
    return validate(
      entries,
      loadStates(
        tx,
        entries.map((e) => e.couponId),
        undefined,
        known,
      ),
    );
  }

  /**
   * Many readings at once (an import): the same rules as every other write, checked in memory against
   * state loaded in three queries; inserts through prepared statements; one audit entry per coupon
   * listing the readings it received; the touched coupons' results rows rewritten in one pass. Nothing
   * is written when any reading is refused: the error lists every problem (see `checkBulk` to get them
   * as data) — unless `skipRefused`, which writes the others and answers the refused ones (an import
   * whose rows were checked before, while other people kept writing). Call it inside one transaction.
   *
   * `audit: 'per-source'` (an import's source only) writes ONE `add-readings` entry on the import instead
   * of one per coupon: counts, stages and the range of weighing and check ids it wrote. Each row carries
   * its source, import id, creator and time, so who added what and when stays answerable from the rows
   * (and the coupon's history shows the import's entries); at 100,000 coupons the per-coupon entries
   * were a third of the commit's writing time for no information the rows lack.
   *
   * `judgedAt`: the change counter (`changeCounter`) read before `checkBulk` accepted EVERY one of these
   * entries. When the counter still has that value inside this transaction, no record changed since that
   * judgement (every write of the records adds an audit entry in its own transaction, from any
   * connection, and audit ids are never reused), so the same rules on the same state would answer the
   * same: the entries are written without judging them again (`judgedAgain: false`). Otherwise they are
   * judged as always. The caller must pass only entries that judgement accepted.
   */
  function bulkAdd(tx: Db, actor: Actor, source: MeasurementSource, entries: readonly MeasurementEntry[], options: BulkAddOptions = {}): BulkAddResult {
    return runSteps(bulkAddInSteps(tx, actor, source, entries, options));
  }

  /**
   * `bulkAdd` a slice at a time: an import's commit holds its transaction open on a connection of its own
   * and gives the event loop a turn between slices (decision 0017); yields the share done (0–1). The
   * caller must not let anything else write on that connection until the steps end.
   */
  function* bulkAddInSteps(
    tx: Db,
    actor: Actor,
    source: MeasurementSource,
    entries: readonly MeasurementEntry[],
    options: BulkAddOptions = {},
  ): Steps<BulkAddResult> {
    const slice = options.slice ?? Number.MAX_SAFE_INTEGER;
    const judgedAgain = options.judgedAt === undefined || lastAuditId(tx) !== options.judgedAt;
    let refused: ReadingProblem[] = [];
    if (judgedAgain) {
      const states = yield* loadStatesInSteps(
        tx,
        entries.map((e) => e.couponId),
        slice,
      );
      refused = validate(entries, states);
      yield 0.2;
    }
    if (refused.length && !options.skipRefused) throw combinedError(errorsOf(refused, batchPrefix));
    const skip = new Set<string>();
    for (const p of refused) skip.add(p.list === null ? `${p.entry}` : `${p.entry}|${p.list}|${p.index}`);
    const importId = importIdOf(source);
    const insW = prepared(tx, INSERT_WEIGHING);
    const insC = prepared(tx, INSERT_CHECK);
    const perSource = options.audit === 'per-source' && importId !== null;
    const perCoupon = new Map<number, { weighings: unknown[]; checks: unknown[] }>();
    const touched = new Set<number>();
    const ranges = { weighings: [Infinity, -Infinity], checks: [Infinity, -Infinity] };
    const stages: Partial<Record<WeighingStage, number>> = {};
    let nw = 0;
    let nc = 0;
    let firstId = Number.MAX_SAFE_INTEGER;
    /** The weighings written, per coupon in the order written: the results refresh need not read them back. */
    const addedByCoupon = new Map<number, WeighingReading[]>();
    const mineOf = (couponId: number) => {
      let mine = perCoupon.get(couponId);
      if (!mine) {
        mine = { weighings: [], checks: [] };
        perCoupon.set(couponId, mine);
      }
      return mine;
    };
    // An import's weighings (no per-reading audit, so no id needed per row) go in INSERT_ROWS rows per
    // statement: one statement per row cost three times as much at 100,000 rows. The rows of one INSERT get
    // consecutive ids (AUTOINCREMENT takes the largest id so far plus one, row after row), the last answered.
    const pending: unknown[] = [];
    // The full statement is prepared once per write (an import's commit has a connection of its own); a
    // shorter one, for the rows left at the end, where it is needed.
    let insertMany: Database.Statement | null = null;
    const flush = () => {
      const rows = pending.length / 4;
      if (rows === 0) return;
      const st =
        rows === INSERT_ROWS
          ? (insertMany ??= client(tx).prepare(insertImported(importId as number, actor.id, rows)))
          : client(tx).prepare(insertImported(importId as number, actor.id, rows));
      const last = Number(st.run(pending).lastInsertRowid);
      stretch(ranges.weighings, last - rows + 1);
      stretch(ranges.weighings, last);
      if (last - rows + 1 < firstId) firstId = last - rows + 1;
      pending.length = 0;
    };
    // Plain loops, no closure per entry: at 100,000 entries the closures (and the name each one is given
    // when the server runs through tsx) cost more than the loop's own work.
    for (let i = 0; i < entries.length; i++) {
      const e = entries[i] as MeasurementEntry;
      if (skip.size && skip.has(`${i}`)) continue;
      const ws = e.weighings ?? NO_READINGS;
      for (let j = 0; j < ws.length; j++) {
        if (skip.size && skip.has(`${i}|weighings|${j}`)) continue;
        const w = ws[j] as WeighingInput;
        stages[w.stage] = (stages[w.stage] ?? 0) + 1;
        nw++;
        const mine = addedByCoupon.get(e.couponId);
        if (mine) mine.push(w);
        else addedByCoupon.set(e.couponId, [w]);
        if (perSource) {
          // The coupon is among addedByCoupon's keys (above), which stand for `touched` below.
          pending.push(e.couponId, w.stage, w.massG, w.measuredAt);
          if (pending.length === INSERT_ROWS * 4) flush();
          continue;
        }
        const id = Number(insW.run(e.couponId, w.stage, w.massG, w.measuredAt, importId, source, actor.id).lastInsertRowid);
        if (id < firstId) firstId = id;
        mineOf(e.couponId).weighings.push({ id, stage: w.stage, massG: w.massG, measuredAt: w.measuredAt });
      }
      const cs = e.checks ?? NO_READINGS;
      for (let j = 0; j < cs.length; j++) {
        if (skip.size && skip.has(`${i}|checks|${j}`)) continue;
        const k = cs[j] as CheckInput;
        const id = Number(insC.run(...checkParams(e.couponId, k, source, actor.id)).lastInsertRowid);
        if (perSource) {
          touched.add(e.couponId);
          stretch(ranges.checks, id);
        } else mineOf(e.couponId).checks.push({ id, ...k });
        nc++;
      }
      if ((i + 1) % slice === 0 && i + 1 < entries.length) {
        flush();
        yield 0.2 + (0.3 * (i + 1)) / entries.length;
      }
    }
    flush();
    // Every coupon once, in the order it first came: those with weighings, then those with only checks.
    let couponIds: number[];
    if (perSource) {
      couponIds = [...addedByCoupon.keys()];
      for (const id of touched) if (!addedByCoupon.has(id)) couponIds.push(id);
    } else couponIds = [...perCoupon.keys()];
    if (perSource) {
      const span = (r: number[]) => (r[0] === Infinity ? null : { first: r[0], last: r[1] });
      auditWriter(tx, actor, 'add-readings', 'import')(
        importId as number,
        null,
        { source, coupons: couponIds.length, weighings: nw, checks: nc, stages, weighingIds: span(ranges.weighings), checkIds: span(ranges.checks) },
        options.reason ?? null,
      );
    } else {
      const audit = auditWriter(tx, actor, 'add-readings');
      for (const [couponId, after] of perCoupon) audit(couponId, null, { source, ...after }, options.reason ?? null);
    }
    yield 0.5;
    // Weighings alone leave the columns computed from checks, and the masses of other stages, as they are.
    const refresh = refreshResultsInSteps(
      tx,
      couponIds,
      nc === 0
        ? { weighingStages: Object.keys(stages) as WeighingStage[], added: { from: firstId, byCoupon: addedByCoupon }, distinct: true }
        : { distinct: true },
      Math.min(slice, 10_000),
    );
    for (let r = refresh.next(); !r.done; r = refresh.next()) yield 0.5 + 0.5 * r.value;
    return { written: { weighings: nw, checks: nc }, couponIds, refused, judgedAgain };
  }

  /**
   * Soft-deletes many current readings at once (an import's undo): every id must name a current
   * reading (the same rule as `deleteWeighing`/`deleteCheck`); one `delete-readings` audit entry per
   * coupon lists what it lost, with its values before, and the reason (or one for them all: see
   * `BulkDeleteOptions.audit`); the touched results rows are rewritten in one pass. Call it inside one
   * transaction.
   */
  function bulkDelete(
    tx: Db,
    actor: Actor,
    ids: { weighings?: readonly number[]; checks?: readonly number[] },
    reason: string,
    options: BulkDeleteOptions = {},
  ) {
    return runSteps(bulkDeleteInSteps(tx, actor, ids, reason, options));
  }

  /**
   * The same, `slice` ids per step of the UPDATE, `slice` coupons per step of the audit entries and of the
   * results refresh (an import's undo of 100,000 weighings, written in a transaction held open across turns
   * of the event loop: decision 0017). Yields the share done: the deletion is the first half, the audit
   * and the refresh the second.
   */
  function* bulkDeleteInSteps(
    tx: Db,
    actor: Actor,
    ids: { weighings?: readonly number[]; checks?: readonly number[] },
    reason: string,
    options: BulkDeleteOptions = {},
  ): Steps<{ deleted: { weighings: number; checks: number }; couponIds: number[]; deletedAt: string }> {
    const slice = options.slice ?? Number.POSITIVE_INFINITY;
    const ofImport = options.audit && options.audit !== 'per-coupon' ? options.audit.importId : null;
    const deletedAt = deps.now().toISOString();
    // Per coupon: the rows it lost, as they were (for its audit entry), or only their stages when one entry
    // on the import stands for them all.
    const perCoupon = new Map<number, { weighings: unknown[]; checks: unknown[] }>();
    const stages = new Set<WeighingStage>();
    const lists = [
      ['weighings', ids.weighings ?? [], 'Weighing', ofImport === null ? 'select *' : 'select id, coupon_id, stage, superseded_by, deleted_at'],
      ['checks', ids.checks ?? [], 'Check', ofImport === null ? 'select *' : 'select id, coupon_id, superseded_by, deleted_at'],
    ] as const;
    const total = (ids.weighings?.length ?? 0) + (ids.checks?.length ?? 0);
    let done = 0;
    for (const [table, all, what, columns] of lists) {
      for (let from = 0; from < all.length; from += slice) {
        const list = from === 0 && all.length <= slice ? all : all.slice(from, from + slice);
        const json = JSON.stringify(list);
        const rows = prepared(tx, `${columns} from ${table} where id in (select value from json_each(?))`).all(json) as {
          id: number;
          coupon_id: number;
          stage?: WeighingStage;
          superseded_by: number | null;
          deleted_at: string | null;
        }[];
        const byId = new Map(rows.map((r) => [r.id, r]));
        for (const id of list) {
          const r = byId.get(id);
          requireCurrent(r && { supersededBy: r.superseded_by, deletedAt: r.deleted_at }, what);
        }
        prepared(tx, `update ${table} set deleted_at = ? where id in (select value from json_each(?))`).run(deletedAt, json);
        for (const r of rows) {
          let mine = perCoupon.get(r.coupon_id);
          if (!mine) {
            mine = { weighings: [], checks: [] };
            perCoupon.set(r.coupon_id, mine);
          }
          if (table === 'weighings') stages.add(r.stage as WeighingStage);
          if (ofImport === null) mine[table].push(camel(r));
        }
        done += list.length;
        if (done < total) yield (done / total) * 0.5;
      }
    }
    if (ofImport !== null) {
      auditWriter(tx, actor, 'delete-readings', 'import')(
        ofImport,
        null,
        { deletedAt, coupons: perCoupon.size, weighings: ids.weighings?.length ?? 0, checks: ids.checks?.length ?? 0, stages: [...stages] },
        reason,
      );
    } else {
      const audit = auditWriter(tx, actor, 'delete-readings');
      let n = 0;
      for (const [couponId, before] of perCoupon) {
        const after = {
          deletedAt,
          weighings: before.weighings.map((r) => (r as { id: number }).id),
          checks: before.checks.map((r) => (r as { id: number }).id),
        };
        audit(couponId, before, after, reason);
        if (++n % slice === 0) yield 0.5 + (n / perCoupon.size) * 0.25;
      }
    }
    const couponIds = [...perCoupon.keys()];
    const refresh = refreshResultsInSteps(tx, couponIds, ids.checks?.length ? {} : { weighingStages: [...stages] }, Math.min(slice, 10_000));
    for (let r = refresh.next(); !r.done; r = refresh.next()) yield 0.75 + r.value * 0.25;
    return { deleted: { weighings: ids.weighings?.length ?? 0, checks: ids.checks?.length ?? 0 }, couponIds, deletedAt };
  }

  /** A correction supersedes: a new row with the new value (source `correction`), the old one pointing at it. */
  function correctWeighing(tx: Db, actor: Actor, id: number, input: CorrectWeighingInput) {
    const old = requireCurrent(weighingById(tx, id), 'Weighing');
    const others = currentWeighingsOf(tx, old.couponId).filter((w) => w.id !== old.id);
    const problem = weighingProblem(old.stage, input.massG, masses(others));
    if (problem) throw problemError('', [problem]);
    const row = insertWeighing(tx, {
      couponId: old.couponId,
      stage: old.stage,
      massG: input.massG,
      measuredAt: input.measuredAt ?? old.measuredAt,
      importId: old.importId,
      source: 'correction',
      createdBy: actor.id,
    });
    markWeighing(tx, old.id, { supersededBy: row.id });
    writeAudit(tx, { actorId: actor.id, action: 'correct', entity: 'weighing', entityId: old.id, before: old, after: row, reason: input.reason });
    refreshResults(tx, [old.couponId]);
    return { row, old: { ...old, supersededBy: row.id } };
  }

  function correctCheck(tx: Db, actor: Actor, id: number, input: CorrectCheckInput) {
    const old = requireCurrent(checkById(tx, id), 'Check');
    const allowed: readonly string[] = CHECK_FIELDS[old.kind];
    const foreign = Object.entries(input)
      .filter(([k, v]) => v !== undefined && !['reason', 'measuredAt', 'method'].includes(k) && !allowed.includes(k))
      .map(([k]) => k);
    if (foreign.length) {
      throw new ValidationFailed(
        `A ${old.kind} check has no ${foreign.join(', ')}`,
        Object.fromEntries(foreign.map((f) => [f, [`Not a field of a ${old.kind} check`]])),
      );
    }
    const next = {
      couponId: old.couponId,
      kind: old.kind,
      stage: old.stage,
      measuredAt: input.measuredAt ?? old.measuredAt,
      lengthMm: input.lengthMm ?? old.lengthMm,
      widthMm: input.widthMm ?? old.widthMm,
      thicknessMm: input.thicknessMm ?? old.thicknessMm,
      volumeCm3: input.volumeCm3 ?? old.volumeCm3,
      hardnessValue: input.hardnessValue ?? old.hardnessValue,
      hardnessScale: input.hardnessScale ?? old.hardnessScale,
      moisturePct: input.moisturePct ?? old.moisturePct,
      method: input.method ?? old.method,
      importId: old.importId,
      source: 'correction' as const,
      createdBy: actor.id,
    };
    const problems = checkProblems(next);
    if (problems.length) throw problemError('', problems);
    const row = insertCheck(tx, next);
    markCheck(tx, old.id, { supersededBy: row.id });
    writeAudit(tx, { actorId: actor.id, action: 'correct', entity: 'check', entityId: old.id, before: old, after: row, reason: input.reason });
    refreshResults(tx, [old.couponId]);
    return { row, old: { ...old, supersededBy: row.id } };
  }

  /** A deletion is soft: the row stays with deleted_at and the reason in the audit log. */
  function deleteWeighing(tx: Db, actor: Actor, id: number, reason: string) {
    const old = requireCurrent(weighingById(tx, id), 'Weighing');
    const deletedAt = deps.now().toISOString();
    markWeighing(tx, id, { deletedAt });
    writeAudit(tx, { actorId: actor.id, action: 'delete', entity: 'weighing', entityId: id, before: old, after: { ...old, deletedAt }, reason });
    refreshResults(tx, [old.couponId]);
    return { old: { ...old, deletedAt } };
  }

  function deleteCheck(tx: Db, actor: Actor, id: number, reason: string) {
    const old = requireCurrent(checkById(tx, id), 'Check');
    const deletedAt = deps.now().toISOString();
    markCheck(tx, id, { deletedAt });
    writeAudit(tx, { actorId: actor.id, action: 'delete', entity: 'check', entityId: id, before: old, after: { ...old, deletedAt }, reason });
    refreshResults(tx, [old.couponId]);
    return { old: { ...old, deletedAt } };
  }

  return {
    addWeighing,
    addCheck,
    batch,
    changeCounter,
    checkBulk,
    bulkAdd,
    bulkAddInSteps,
    bulkDelete,
    bulkDeleteInSteps,
    correctWeighing,
    correctCheck,
    deleteWeighing,
    deleteCheck,
  };
}

export type Measurements = ReturnType<typeof createMeasurements>;
