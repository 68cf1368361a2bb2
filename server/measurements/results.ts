import type Database from 'better-sqlite3';
import { getTableColumns, sql } from 'drizzle-orm';
import type { Db } from '../db/client';
import { getTableConfig } from 'drizzle-orm/sqlite-core';
import { couponResults, type CouponResultValues } from '../db/schema/results';
import { WEIGHING_STAGES, type CheckStage, type CouponRole, type HardnessScale, type WeighingStage } from '../../shared/constants/records';
import { runSteps, type Steps } from './steps';
import { checkVolumeCm3, couponMetrics, type CheckReading, type WeighingReading } from '../../shared/coupons/metrics';

/** What a results row is keyed by: the coupon and where it sits (trial, run, lot, resin). */
export interface ResultKeys {
  couponId: number;
  tag: string;
  trialId: number | null;
  conditionId: number | null;
  runId: number | null;
  speciesId: number;
  role: CouponRole;
  sourceBoard: string | null;
  resinId: number | null;
  resinLotId: number | null;
  curedDensityGcm3: number | null;
}

export interface StoredWeighing extends WeighingReading {
  couponId: number;
}
export interface StoredCheck extends CheckReading {
  couponId: number;
}

const HARDNESS_COLUMN: Record<CheckStage, Record<HardnessScale, keyof CouponResultValues>> = {
  dry: { 'shore-d': 'hardnessDryShoreD', 'janka-n': 'hardnessDryJankaN', 'brinell-hb': 'hardnessDryBrinellHb' },
  cured: { 'shore-d': 'hardnessCuredShoreD', 'janka-n': 'hardnessCuredJankaN', 'brinell-hb': 'hardnessCuredBrinellHb' },
  'wet-test': { 'shore-d': 'hardnessWetTestShoreD', 'janka-n': 'hardnessWetTestJankaN', 'brinell-hb': 'hardnessWetTestBrinellHb' },
};

/**
 * The results row of one coupon from its keys and current readings (in measured_at, id order), through
 * couponMetrics: the same function the client's grid runs, so the stored numbers cannot disagree with it.
 * The drying checks, the dry dimensions and the meter reading are picked in one pass each (no filtered
 * copies): the first drying check is the earliest (the first of equal times), the others the latest (the
 * last of equal times), as a stable sort and `latest` of shared/coupons/metrics.ts pick them.
 */
export function resultValues(k: ResultKeys, ws: readonly WeighingReading[], cs: readonly CheckReading[]): CouponResultValues {
  const m = couponMetrics({ role: k.role, weighings: ws, checks: cs, resin: k.curedDensityGcm3 === null ? null : { curedDensityGcm3: k.curedDensityGcm3 } });
  let dryingCount = 0;
  let firstDrying: WeighingReading | undefined;
  let lastDrying: WeighingReading | undefined;
  for (const w of ws) {
    if (w.stage !== 'drying-check') continue;
    dryingCount++;
    const t = Date.parse(w.measuredAt);
    if (!firstDrying || t < Date.parse(firstDrying.measuredAt)) firstDrying = w;
    if (!lastDrying || t >= Date.parse(lastDrying.measuredAt)) lastDrying = w;
  }
  let dryDim: CheckReading | undefined;
  let meter: CheckReading | undefined;
  for (const c of cs) {
    if (c.stage !== 'dry') continue;
    if (c.kind === 'dimension') {
      if (checkVolumeCm3(c) !== null && (!dryDim || Date.parse(c.measuredAt) >= Date.parse(dryDim.measuredAt))) dryDim = c;
    } else if (c.kind === 'moisture' && c.moisturePct != null && (!meter || Date.parse(c.measuredAt) >= Date.parse(meter.measuredAt))) meter = c;
  }
  const row: CouponResultValues = {
    couponId: k.couponId,
    tag: k.tag,
    trialId: k.trialId,
    conditionId: k.conditionId,
    runId: k.runId,
    speciesId: k.speciesId,
    resinId: k.resinId,
    resinLotId: k.resinLotId,
    role: k.role,
    sourceBoard: k.sourceBoard,
    dryMassG: m.dryMassG,
    soakedMassG: m.soakedMassG,
    curedMassG: m.curedMassG,
    wetTestMassG: m.wetTestMassG,
    dryingCheckCount: dryingCount,
    firstDryingCheckMassG: firstDrying?.massG ?? null,
    lastDryingCheckMassG: lastDrying?.massG ?? null,
    lastDryingCheckAt: lastDrying?.measuredAt ?? null,
    dryLengthMm: dryDim?.lengthMm ?? null,
    dryWidthMm: dryDim?.widthMm ?? null,
    dryThicknessMm: dryDim?.thicknessMm ?? null,
    dryVolumeCm3: m.dryVolumeCm3,
    curedVolumeCm3: m.curedVolumeCm3,
    wetTestVolumeCm3: m.wetTestVolumeCm3,
    dryMoisturePct: meter?.moisturePct ?? null,
    hardnessDryShoreD: null,
    hardnessDryJankaN: null,
    hardnessDryBrinellHb: null,
    hardnessCuredShoreD: null,
    hardnessCuredJankaN: null,
    hardnessCuredBrinellHb: null,
    hardnessWetTestShoreD: null,
    hardnessWetTestJankaN: null,
    hardnessWetTestBrinellHb: null,
    thicknessMm: m.thicknessMm,
    mcPct: m.mcPct,
    mcSource: m.mcSource,
    dryDensityKgM3: m.dryDensityKgM3,
    drySg: m.drySg,
    wpgPct: m.wpgPct,
    wetUptakePct: m.wetUptakePct,
    resinLoadingKgM3: m.resinLoadingKgM3,
    voidFillPct: m.voidFillPct,
    maxWpgPct: m.maxWpgPct,
    cureLossPct: m.cureLossPct,
    bulkingPct: m.bulkingPct,
    swellingPct: m.swellingPct,
    swellingBasis: m.swellingBasis,
    hardness: m.hardness,
    problems: m.problems,
    problemCount: m.problems.length,
  };
  for (const h of m.hardness) (row as Record<string, unknown>)[HARDNESS_COLUMN[h.stage][h.scale]] = h.value;
  return row;
}

// Raw SQL below: one statement each, bound with a single JSON array so no list of ids ever becomes
// thousands of SQL variables (SQLite stops at 32,766).

const KEYS_SQL = `
  select c.id as couponId, c.tag, c.trial_id as trialId, c.condition_id as conditionId, c.run_id as runId,
         c.species_id as speciesId, c.role, c.source_board as sourceBoard,
         coalesce(rl.resin_id, tc.resin_id) as resinId, r.resin_lot_id as resinLotId, rs.cured_density_g_cm3 as curedDensityGcm3
  from coupons c
  left join runs r on r.id = c.run_id
  left join resin_lots rl on rl.id = r.resin_lot_id
  left join trial_conditions tc on tc.id = c.condition_id
  left join resins rs on rs.id = coalesce(rl.resin_id, tc.resin_id)`;
const WEIGHINGS_SQL = `select w.coupon_id as couponId, w.stage, w.mass_g as massG, w.measured_at as measuredAt, w.id from weighings w`;
const CHECKS_SQL = `
  select k.coupon_id as couponId, k.kind, k.stage, k.measured_at as measuredAt, k.length_mm as lengthMm, k.width_mm as widthMm,
         k.thickness_mm as thicknessMm, k.volume_cm3 as volumeCm3, k.hardness_value as hardnessValue, k.hardness_scale as hardnessScale,
         k.moisture_pct as moisturePct
  from checks k`;
const IDS = `(select value from json_each(?))`;

// The reads answer rows as arrays (preparedRaw), in the column order of the SQL above; each row becomes a
// JS object of one fixed shape here, which costs far less than better-sqlite3 naming every column.
type KeysRow = [number, string, number | null, number | null, number | null, number, string, string | null, number | null, number | null, number | null];
type WeighingRow = [number, string, number, string, number];
type CheckRow = [number, string, string, string, number | null, number | null, number | null, number | null, number | null, string | null, number | null];

const keysOf = (r: KeysRow): ResultKeys => ({
  couponId: r[0],
  tag: r[1],
  trialId: r[2],
  conditionId: r[3],
  runId: r[4],
  speciesId: r[5],
  role: r[6] as CouponRole,
  sourceBoard: r[7],
  resinId: r[8],
  resinLotId: r[9],
  curedDensityGcm3: r[10],
});

/** Current weighings by coupon, each list in measured_at, id order (the order of the rows read). */
function weighingsByCoupon(rows: WeighingRow[]): Map<number, WeighingReading[]> {
  const out = new Map<number, WeighingReading[]>();
  for (const r of rows) {
    const w: WeighingReading = { stage: r[1] as WeighingReading['stage'], massG: r[2], measuredAt: r[3] };
    const list = out.get(r[0]);
    if (list) list.push(w);
    else out.set(r[0], [w]);
  }
  return out;
}

function checksByCoupon(rows: CheckRow[]): Map<number, CheckReading[]> {
  const out = new Map<number, CheckReading[]>();
  for (const r of rows) {
    const c = {
      kind: r[1],
      stage: r[2],
      measuredAt: r[3],
      lengthMm: r[4],
      widthMm: r[5],
      thicknessMm: r[6],
      volumeCm3: r[7],
      hardnessValue: r[8],
      hardnessScale: r[9],
      moisturePct: r[10],
    } as CheckReading;
    const list = out.get(r[0]);
    if (list) list.push(c);
    else out.set(r[0], [c]);
  }
  return out;
}

// Prepared once per connection (server/db/prepared.ts); re-exported for the module's callers.
export { client, prepared, preparedRaw } from '../db/prepared';
import { client, prepared, preparedRaw } from '../db/prepared';

const COLUMNS = Object.entries(getTableColumns(couponResults)).map(([key, col]) => ({ key, name: col.name }));
// An upsert, not `insert or replace`: replace deletes the row and inserts it again, touching all seven
// indexes twice; an update touches only the indexes whose columns changed (none, for new readings).
// Positional parameters: binding 51 named ones cost more than the write.
const UPSERT_SQL = `insert into coupon_results (${COLUMNS.map((c) => c.name).join(', ')}) values (${COLUMNS.map(() => '?').join(', ')})
  on conflict (coupon_id) do update set ${COLUMNS.filter((c) => c.key !== 'couponId')
    .map((c) => `${c.name} = excluded.${c.name}`)
    .join(', ')}`;

// The lean path: SQLite decides which indexes an UPDATE rewrites from the columns its SET names, not from
// whether their values change, so the upsert above rewrites all six indexes of every row it updates. A new
// reading changes readings and metrics, never the keys the indexes are on: this UPDATE sets only the
// unindexed columns, and only when the stored indexed keys are still the same (`is` matches nulls);
// when it changes no row (a new coupon, or one whose run, species, lot… moved) the upsert runs.
const INDEXED = new Set(getTableConfig(couponResults).indexes.flatMap((i) => i.config.columns.map((c) => (c as { name: string }).name)));
const KEY_COLUMNS = COLUMNS.filter((c) => INDEXED.has(c.name));
const VALUE_COLUMNS = COLUMNS.filter((c) => c.key !== 'couponId' && !INDEXED.has(c.name));
const UPDATE_SQL = `update coupon_results set ${VALUE_COLUMNS.map((c) => `${c.name} = ?`).join(', ')}
  where coupon_id = ? and ${KEY_COLUMNS.map((c) => `${c.name} is ?`).join(' and ')}`;

/**
 * Columns computed from a coupon's checks alone (dimensions, volumes, the meter reading, hardness; see
 * resultValues and couponMetrics): a write of weighings only cannot move them, so its refresh leaves them
 * as stored. Every other value column can move with a weighing (masses, drying checks, moisture from the
 * first drying check, every mass-based metric, the problems).
 */
const CHECKS_ONLY = new Set<string>([
  'dryLengthMm',
  'dryWidthMm',
  'dryThicknessMm',
  'dryVolumeCm3',
  'curedVolumeCm3',
  'wetTestVolumeCm3',
  'dryMoisturePct',
  'thicknessMm',
  'bulkingPct',
  'hardness',
  ...Object.values(HARDNESS_COLUMN).flatMap((byScale) => Object.values(byScale)),
]);
/**
 * The stored mass columns of each weighing stage. Three of them decide whether a row sits in a partial
 * index (coupons still waiting for their dry, soaked or cured weighing, migration 0012), and SQLite
 * rewrites a partial index's entry whenever an UPDATE sets a column of its WHERE clause, changed or not: a
 * dry import that also set the (unchanged) soaked and cured masses rewrote two index entries per coupon,
 * more than half of its results write. So a weighings-only refresh sets the mass columns of the stages
 * written and leaves the others as stored (they cannot have moved).
 */
const STAGE_COLUMNS: Record<WeighingStage, readonly (keyof CouponResultValues)[]> = {
  dry: ['dryMassG'],
  soaked: ['soakedMassG'],
  cured: ['curedMassG'],
  'wet-test': ['wetTestMassG'],
  'drying-check': ['dryingCheckCount', 'firstDryingCheckMassG', 'lastDryingCheckMassG', 'lastDryingCheckAt'],
};
const ANY_STAGE_COLUMN = new Set<string>(Object.values(STAGE_COLUMNS).flat());

/** The columns a weighings-only refresh of these stages may set, built once per set of stages. */
const weighingColumnSets = new Map<string, { key: string; name: string; json: boolean }[]>();
function weighingColumns(stages: readonly WeighingStage[]) {
  const key = WEIGHING_STAGES.filter((s) => stages.includes(s)).join(',');
  let cols = weighingColumnSets.get(key);
  if (!cols) {
    const mine = new Set<string>(stages.flatMap((s) => STAGE_COLUMNS[s]));
    cols = VALUE_COLUMNS.filter((c) => !CHECKS_ONLY.has(c.key) && (!ANY_STAGE_COLUMN.has(c.key) || mine.has(c.key))).map((c) => ({
      ...c,
      json: c.key === 'hardness' || c.key === 'problems',
    }));
    // refreshAfterWeighings marks the moved columns as bits of one 32-bit integer.
    if (cols.length > 31) throw new Error(`A weighings-only refresh may set ${cols.length} columns; at most 31 fit its bit mask`);
    weighingColumnSets.set(key, cols);
  }
  return cols;
}

/** How each bound column is read from a computed row: its key, and whether it is stored as JSON text. */
type Binder = { key: string; json: boolean }[];
const binder = (cols: { key: string }[]): Binder => cols.map((c) => ({ key: c.key, json: c.key === 'hardness' || c.key === 'problems' }));
const ALL_BINDER = binder(COLUMNS);
const KEY_BINDER = binder(KEY_COLUMNS);
const VALUE_BINDER = binder(VALUE_COLUMNS);

function bindInto(out: unknown[], rec: Record<string, unknown>, cols: Binder) {
  for (const c of cols) {
    const x = rec[c.key];
    out.push(c.json ? JSON.stringify(x) : (x ?? null));
  }
  return out;
}

const bindable = (v: CouponResultValues): unknown[] => bindInto([], v as unknown as Record<string, unknown>, ALL_BINDER);

/** The lean UPDATE's parameters: the value columns it sets, the coupon id, then the indexed keys it must still match. */
function updateBindable(v: CouponResultValues, values: Binder): unknown[] {
  const rec = v as unknown as Record<string, unknown>;
  const out = bindInto([], rec, values);
  out.push(v.couponId);
  return bindInto(out, rec, KEY_BINDER);
}

const NONE: readonly never[] = [];
/** Any instant: the probe weighings of refreshAfterWeighings' lone-weighing path. */
const LONE_PROBE_AT = '2000-01-01T00:00:00.000Z';

function writeRows(tx: Db, keys: KeysRow[], ws: Map<number, WeighingReading[]>, cs: Map<number, CheckReading[]>, fresh = false): number {
  const upsert = prepared(tx, UPSERT_SQL);
  const update = prepared(tx, UPDATE_SQL);
  const values = VALUE_BINDER;
  for (const r of keys) {
    const row = resultValues(keysOf(r), ws.get(r[0]) ?? NONE, cs.get(r[0]) ?? NONE);
    if (fresh || update.run(updateBindable(row, values)).changes === 0) upsert.run(bindable(row));
  }
  return keys.length;
}

/**
 * What changed since these rows were last written, when the caller knows it. `weighingStages`: weighings
 * of these stages were added or removed and nothing else, so the columns computed from checks alone and
 * the masses of other stages are left as stored (the table is always current, so they already hold what
 * a full refresh would write); a row whose indexed keys moved, or a missing row, is still written in full.
 */
export interface RefreshOptions {
  weighingStages?: readonly WeighingStage[];
  /**
   * With weighingStages: the change only ADDED these weighings, whose ids are `from` on (ids only grow), each
   * coupon's in the order written. The refresh then reads only the weighings before them, and computes what
   * the rows held rather than reading it.
   */
  added?: AddedWeighings;
  /** The ids have no repeats (a bulk write's coupons, each once): they are not made unique again. */
  distinct?: boolean;
}
export interface AddedWeighings {
  from: number;
  byCoupon: ReadonlyMap<number, readonly WeighingReading[]>;
}

/**
 * Recomputes the results rows of these coupons from their current readings and keys. Call it inside
 * the transaction of the change (every write of server/measurements does; a feature that moves a
 * coupon between runs, changes its species or role, or creates coupons calls it for those coupons).
 */
export function refreshResults(tx: Db, couponIds: readonly number[], options: RefreshOptions = {}): number {
  return runSteps(refreshResultsInSteps(tx, couponIds, options));
}

/**
 * The same, a slice of `slice` coupons per step (an import's 100,000 coupons: their readings, keys and
 * computed rows are never all in memory at once, and the caller may give the event loop a turn between
 * slices). Yields the share done.
 */
export function* refreshResultsInSteps(tx: Db, couponIds: readonly number[], options: RefreshOptions = {}, slice = REFRESH_CHUNK): Steps<number> {
  if (couponIds.length === 0) return 0;
  const unique = couponIds.length === 1 || options.distinct ? couponIds : [...new Set(couponIds)];
  const stages = options.weighingStages ?? null;
  const added = options.added ?? null;
  let n = 0;
  for (let from = 0; from < unique.length; from += slice) {
    n += refreshSome(tx, from === 0 && unique.length <= slice ? unique : unique.slice(from, from + slice), stages, added);
    if (from + slice < unique.length) yield (from + slice) / unique.length;
  }
  return n;
}

/** Coupons whose results are recomputed per slice of a large refresh. */
const REFRESH_CHUNK = 10_000;

function refreshSome(tx: Db, unique: readonly number[], weighingStages: readonly WeighingStage[] | null, added: AddedWeighings | null = null): number {
  if (weighingStages) return refreshAfterWeighings(tx, unique, weighingStages, added);
  const ids = JSON.stringify(unique);
  const keys = preparedRaw(tx, `${KEYS_SQL} where c.id in ${IDS}`).all(ids) as KeysRow[];
  const { ws, cs } = readingsOf(tx, ids);
  return writeRows(tx, keys, ws, cs);
}

/** The current weighings and checks of these coupons (ids as one JSON array), grouped by coupon. */
function readingsOf(tx: Db, ids: string) {
  const ws = preparedRaw(
    tx,
    `${WEIGHINGS_SQL} where w.coupon_id in ${IDS} and w.superseded_by is null and w.deleted_at is null order by w.measured_at, w.id`,
  ).all(ids) as WeighingRow[];
  return { ws: weighingsByCoupon(ws), cs: checksOf(tx, ids) };
}

/** Coupons from which a read of many asks first whether there is anything to read (`mayHaveReadings`). */
const PROBE_FROM = 1_000;

/**
 * False when no current reading of `table` (for weighings, with an id below `before`) belongs to a coupon
 * whose id lies between the smallest and the largest of `ids`: one index range probe that stops at its
 * first row. A per-coupon read of these coupons would then answer nothing, and is skipped: a big write of
 * first readings (a run's coupons are created together, so their ids are close) saves one lookup per
 * coupon (~35 ms per read of 100,000). True when the probe finds one, and for fewer than PROBE_FROM
 * coupons (their read is cheap), so the read runs as always.
 */
export function mayHaveReadings(tx: Db, table: 'weighings' | 'checks', ids: readonly number[], before = Number.MAX_SAFE_INTEGER): boolean {
  if (ids.length < PROBE_FROM) return true;
  let lo = Infinity;
  let hi = -Infinity;
  for (const id of ids) {
    if (id < lo) lo = id;
    if (id > hi) hi = id;
  }
  // `table` is one of two names of our own, never text from a request.
  const sql = `select 1 from ${table} where coupon_id between ? and ? and id < ? and superseded_by is null and deleted_at is null limit 1`;
  return prepared(tx, sql).get(lo, hi, before) !== undefined;
}

function checksOf(tx: Db, ids: string, unique?: readonly number[]) {
  if (unique && !mayHaveReadings(tx, 'checks', unique)) return new Map<number, CheckReading[]>();
  return checksByCoupon(
    preparedRaw(tx, `${CHECKS_SQL} where k.coupon_id in ${IDS} and k.superseded_by is null and k.deleted_at is null order by k.measured_at, k.id`).all(
      ids,
    ) as CheckRow[],
  );
}

/** A coupon's weighings before a write and the ones it added, in measured_at, id order (the added ids are the larger). */
function withAdded(before: readonly WeighingReading[], added: readonly WeighingReading[]): readonly WeighingReading[] {
  const all = before.length === 0 ? added : added.length === 0 ? before : [...before, ...added];
  // Array sort is stable: equal times keep the earlier id first, as the SQL order does.
  return all.length < 2 ? all : [...all].sort((a, b) => (a.measuredAt < b.measuredAt ? -1 : a.measuredAt > b.measuredAt ? 1 : 0));
}

/**
 * What a weighings-only refresh reads of a stored row besides the columns it may set: the keys the values
 * depend on (the role, and the resin for its cured density). The other keys only name the row, and an
 * UPDATE of the value columns leaves them as stored.
 */
const STORED_KEYS = ['couponId', 'role', 'resinId'] as const;
const nameOf = (key: string) => (COLUMNS.find((c) => c.key === key) as { name: string }).name;

/** Rows updated per statement by a weighings-only refresh. */
const UPDATE_ROWS = 50;

/**
 * An UPDATE of exactly these columns of `rows` rows, prepared once per connection, set of columns and row
 * count: its parameters are each row's coupon id then its values, row after row (`update … from (values …)`:
 * one statement per row cost twice as much at 100,000 rows).
 */
function updateOf(tx: Db, cols: readonly { name: string }[], rows: number) {
  const set = cols.map((c, i) => `${c.name} = v.column${i + 2}`).join(', ');
  const row = `(${Array(cols.length + 1)
    .fill('?')
    .join(', ')})`;
  return prepared(tx, `update coupon_results set ${set} from (values ${Array(rows).fill(row).join(', ')}) as v where coupon_results.coupon_id = v.column1`);
}

/**
 * The role and resin of these coupons' stored rows, grouped: each pair with its coupons as one JSON array of
 * ids. When the ids are exactly every id between the smallest and the largest (an import of a run's
 * coupons, created together: the usual case), they are asked for as that range, which reads the rows in
 * order without first making a lookup table of the ids (~45 ms less per 100,000 coupons).
 */
function rolesAndResins(tx: Db, unique: readonly number[], ids: string): unknown[][] {
  const group = 'group by role, resin_id';
  const select = 'select role, resin_id, json_group_array(coupon_id order by coupon_id) from coupon_results';
  let lo = Infinity;
  let hi = -Infinity;
  for (const id of unique) {
    if (id < lo) lo = id;
    if (id > hi) hi = id;
  }
  // `unique` has no repeats, so as many ids as the range holds are all of them.
  if (hi - lo + 1 === unique.length) return preparedRaw(tx, `${select} where coupon_id between ? and ? ${group}`).all(lo, hi) as unknown[][];
  return preparedRaw(tx, `${select} where coupon_id in ${IDS} ${group}`).all(ids) as unknown[][];
}

/**
 * The refresh after weighings of these stages were added or removed, and nothing else. The keys come from
 * the stored results rows themselves (a reading changes none of them, and every change of a coupon's keys
 * refreshes its row in the same transaction); each coupon's row is computed from its readings, and only
 * the columns whose value moved are written: a coupon's first dry weighing moves one or two of them, and
 * SQLite's cost grows with every column bound and set. What a column held is read from the stored row, or,
 * when the write only added weighings (ids from `newFrom` on), computed from the readings without them,
 * which is what the row holds (the table is always current) and costs less than reading 30 columns of
 * 100,000 rows. A coupon without a stored row gets the full path.
 */
function refreshAfterWeighings(tx: Db, unique: readonly number[], stages: readonly WeighingStage[], added: AddedWeighings | null): number {
  const cols = weighingColumns(stages);
  const ids = JSON.stringify(unique);
  const readStored = added === null;
  // When the write only added weighings, what a row holds is computed, not read (see below), so only its
  // role and resin are read: grouped by them, each group's coupons as one JSON array of ids (100,000 rows
  // of three values each cost more to hand to JS than the reading itself). Otherwise row by row.
  const rows = readStored
    ? (preparedRaw(tx, `select ${[...STORED_KEYS.map(nameOf), ...cols.map((c) => c.name)].join(', ')} from coupon_results where coupon_id in ${IDS}`).all(
        ids,
      ) as unknown[][])
    : [];
  const classes = readStored ? [] : (rolesAndResins(tx, unique, ids) as [CouponRole, number | null, string][]);
  const groupIds = classes.map((c) => JSON.parse(c[2]) as number[]);
  const storedCount = readStored ? rows.length : groupIds.reduce((n, g) => n + g.length, 0);
  let missing: number[] = [];
  if (storedCount < unique.length) {
    const have = new Set(readStored ? rows.map((r) => r[0] as number) : groupIds.flat());
    missing = unique.filter((id) => !have.has(id));
  }
  const density = new Map((preparedRaw(tx, 'select id, cured_density_g_cm3 from resins').all() as [number, number][]).map(([id, d]) => [id, d] as const));
  // After an import of first weighings, the weighings before it are none: only those are read.
  const ws = added
    ? mayHaveReadings(tx, 'weighings', unique, added.from)
      ? weighingsByCoupon(
          preparedRaw(
            tx,
            `${WEIGHINGS_SQL} where w.coupon_id in ${IDS} and w.id < ? and w.superseded_by is null and w.deleted_at is null order by w.measured_at, w.id`,
          ).all(ids, added.from) as WeighingRow[],
        )
      : new Map<number, WeighingReading[]>()
    : readingsOf(tx, ids).ws;
  const cs = checksOf(tx, ids, unique);
  // What a row with no readings holds depends on its role and resin alone: its column values are computed
  // once per pair (an import of first weighings compares 100,000 rows against a handful of these).
  const empty = new Map<string, unknown[]>();
  const first = STORED_KEYS.length;
  // The rows to write, grouped by the set of columns that moved (a bit each; at most 31 columns): each
  // group's parameters are the coupon id then the moved values, row after row.
  const groups = new Map<number, unknown[]>();
  const moved: unknown[] = [];
  // Full groups in one statement; what is left of a group row by row, so each set of columns has two
  // statements prepared, not one per row count. The full one is found once per refresh (its SQL text is
  // long: building and hashing it for every run cost more than binding).
  const statements = new Map<number, { width: number; many: Database.Statement; cols: typeof cols }>();
  const write = (mask: number, params: unknown[]) => {
    let st = statements.get(mask);
    if (!st) {
      const set = weighingCols.filter((_, i) => mask & (1 << i));
      st = { width: set.length + 1, many: updateOf(tx, set, UPDATE_ROWS), cols: set };
      statements.set(mask, st);
    }
    const width = st.width;
    if (params.length === UPDATE_ROWS * width) return void st.many.run(params);
    const one = updateOf(tx, st.cols, 1);
    for (let at = 0; at < params.length; at += width) one.run(params.slice(at, at + width));
  };
  const weighingCols = cols;
  const valueOf = (row: Record<string, unknown>, c: (typeof cols)[number]) => {
    const x = row[c.key];
    if (!c.json) return x ?? null;
    // Most rows of a big write have no problems: their list is stored as '[]' without serialising it.
    return Array.isArray(x) && x.length === 0 ? '[]' : JSON.stringify(x);
  };
  const valuesOf = (row: Record<string, unknown>) => cols.map((c) => valueOf(row, c));
  // The naming keys are not read (see STORED_KEYS): the columns set here do not come from them.
  const classKeys = (role: CouponRole, resinId: number | null): ResultKeys => ({
    couponId: 0,
    tag: '',
    trialId: null,
    conditionId: null,
    runId: null,
    speciesId: 0,
    role,
    sourceBoard: null,
    resinId,
    resinLotId: null,
    curedDensityGcm3: resinId === null ? null : (density.get(resinId) ?? null),
  });
  // A coupon's first reading, one weighing and nothing else (an import of a run's dry weighings): per role,
  // resin and stage, which one column it moves, found by computing the row with two probe masses against
  // the empty row. When exactly one column moves and holds the mass as given, the coupon's row is that
  // column set to its mass, without computing it (~150 ms less per 100,000); otherwise (-1) it is computed.
  // That a lone weighing yields no metric is tested for every role, stage and mass (results.test.ts).
  const lone = new Map<string, number>();
  const loneColumn = (keys: ResultKeys, stage: WeighingStage, none: readonly unknown[]) => {
    const k = `${keys.role}|${keys.curedDensityGcm3}|${stage}`;
    let at = lone.get(k);
    if (at === undefined) {
      at = -1;
      for (const probe of [1, 23.456]) {
        const row = valuesOf(resultValues(keys, [{ stage, massG: probe, measuredAt: LONE_PROBE_AT }], NONE) as unknown as Record<string, unknown>);
        const differ = row.flatMap((v, i) => (v === none[i] ? [] : [i]));
        const i = differ.length === 1 && row[differ[0] as number] === probe ? (differ[0] as number) : -1;
        if (i < 0 || (at >= 0 && i !== at)) {
          at = -1;
          break;
        }
        at = i;
      }
      lone.set(k, at);
    }
    return at;
  };
  let lastKeys: ResultKeys | null = null;
  let lastStage: WeighingStage | null = null;
  let lastCol = -1;
  /** What a row with no readings holds, per role and resin (computed once per pair). */
  const emptyOf = (keys: ResultKeys) => {
    const k = `${keys.role}|${keys.curedDensityGcm3}`;
    let e = empty.get(k);
    if (!e) {
      e = valuesOf(resultValues(keys, NONE, NONE) as unknown as Record<string, unknown>);
      empty.set(k, e);
    }
    return e;
  };
  /** Adds one row's moved values to its group of the same columns, and writes a full group. */
  const plan = (couponId: number, mask: number) => {
    let params = groups.get(mask);
    if (!params) {
      params = [];
      groups.set(mask, params);
    }
    params.push(couponId, ...moved);
    if (params.length === UPDATE_ROWS * (moved.length + 1)) {
      write(mask, params);
      params.length = 0;
    }
  };
  /** Plans one coupon's row; `r` is its stored row when read (its values from `first` on), else null. */
  const planRow = (keys: ResultKeys, r: readonly unknown[] | null) => {
    const checks = cs.get(keys.couponId) ?? NONE;
    const earlier = ws.get(keys.couponId) ?? NONE;
    if (added && earlier.length === 0 && checks.length === 0) {
      const mine = added.byCoupon.get(keys.couponId) ?? NONE;
      if (mine.length === 1) {
        const w = mine[0] as WeighingReading;
        // The keys object is one per role and resin (below): the last answer is reused while they stay.
        if (keys !== lastKeys || w.stage !== lastStage) {
          lastKeys = keys;
          lastStage = w.stage;
          lastCol = loneColumn(keys, w.stage, emptyOf(keys));
        }
        const col = lastCol;
        if (col >= 0) {
          moved.length = 0;
          moved.push(w.massG);
          return plan(keys.couponId, 1 << col);
        }
      }
    }
    const row = resultValues(keys, added ? withAdded(earlier, added.byCoupon.get(keys.couponId) ?? NONE) : earlier, checks) as unknown as Record<
      string,
      unknown
    >;
    // What the row holds now, column by column from `at`: as read, after its keys; or, when the write only
    // added weighings, computed from the readings before them.
    let was: readonly unknown[] = r ?? NONE;
    let at: number = first;
    if (added) {
      at = 0;
      if (earlier.length === 0 && checks.length === 0) was = emptyOf(keys);
      else was = valuesOf(resultValues(keys, earlier, checks) as unknown as Record<string, unknown>);
    }
    let mask = 0;
    moved.length = 0;
    for (let i = 0; i < cols.length; i++) {
      const v = valueOf(row, cols[i] as (typeof cols)[number]);
      if (v !== was[at + i]) {
        mask |= 1 << i;
        moved.push(v);
      }
    }
    if (mask !== 0) plan(keys.couponId, mask);
  };
  for (const r of rows) planRow({ ...classKeys(r[1] as CouponRole, r[2] as number | null), couponId: r[0] as number }, r);
  // One keys object per role and resin, its coupon id set before each row (resultValues copies it out).
  classes.forEach(([role, resinId], g) => {
    const keys = classKeys(role, resinId);
    for (const id of groupIds[g] as number[]) {
      keys.couponId = id;
      planRow(keys, null);
    }
  });
  for (const [mask, params] of groups) if (params.length) write(mask, params);
  if (missing.length) refreshSome(tx, missing, null);
  return unique.length;
}

/** Refreshes every coupon of a run (its lot, and so its resin, changed). */
export function refreshResultsOfRun(tx: Db, runId: number): number {
  const ids = (client(tx).prepare('select id from coupons where run_id = ?').all(runId) as { id: number }[]).map((r) => r.id);
  return refreshResults(tx, ids);
}

/**
 * Throws the table away and writes it again from the readings, in one pass over each table (no
 * per-coupon queries). `npm run db:rebuild-results`; also run at start when the table lacks rows.
 */
export function rebuildResults(tx: Db): number {
  const c = client(tx);
  c.prepare('delete from coupon_results').run();
  const keys = preparedRaw(tx, `${KEYS_SQL} order by c.id`).all() as KeysRow[];
  const ws = preparedRaw(tx, `${WEIGHINGS_SQL} where w.superseded_by is null and w.deleted_at is null order by w.measured_at, w.id`).all() as WeighingRow[];
  const cs = preparedRaw(tx, `${CHECKS_SQL} where k.superseded_by is null and k.deleted_at is null order by k.measured_at, k.id`).all() as CheckRow[];
  return writeRows(tx, keys, weighingsByCoupon(ws), checksByCoupon(cs), true);
}

/** True when some coupon has no results row (a database from before the table, or a restored backup). */
export function resultsIncomplete(tx: Db): boolean {
  const row = tx.get<{ missing: number }>(
    sql`select exists (select 1 from coupons c where not exists (select 1 from coupon_results r where r.coupon_id = c.id)) as missing`,
  );
  return row.missing === 1;
}

/** Coupons whose resin is this one (through their run's lot, else their trial condition), as KEYS_SQL resolves it. */
export function couponIdsOfResin(tx: Db, resinId: number): number[] {
  const rows = client(tx)
    .prepare(
      `select c.id from coupons c
       left join runs r on r.id = c.run_id
       left join resin_lots rl on rl.id = r.resin_lot_id
       left join trial_conditions tc on tc.id = c.condition_id
       where coalesce(rl.resin_id, tc.resin_id) = ?`,
    )
    .all(resinId) as { id: number }[];
  return rows.map((r) => r.id);
}

/** The metrics a change of a coupon's inputs (not of its readings) can move, compared before and after. */
const MOVABLE = [
  'wpgPct',
  'voidFillPct',
  'maxWpgPct',
  'resinLoadingKgM3',
  'cureLossPct',
  'bulkingPct',
  'swellingPct',
  'dryDensityKgM3',
  'drySg',
  'mcPct',
] as const;
export type MovedResult = { couponId: number; before: Record<string, unknown>; after: Record<string, unknown> };

/**
 * Runs `change` (which alters an input of the results, e.g. a resin's cured density) and recomputes
 * the results of these coupons, answering the coupons whose stored metrics moved, with the metrics that
 * moved before and after. Inside the caller's transaction, so the caller can still refuse (throw).
 */
export function refreshResultsAround(tx: Db, couponIds: readonly number[], change: () => void): MovedResult[] {
  const ids = JSON.stringify([...new Set(couponIds)]);
  const cols = MOVABLE.map((k) => `${getTableColumns(couponResults)[k].name} as ${k}`).join(', ');
  const read = () =>
    new Map(
      (
        client(tx).prepare(`select coupon_id as couponId, ${cols} from coupon_results where coupon_id in ${IDS}`).all(ids) as ({ couponId: number } & Record<
          string,
          unknown
        >)[]
      ).map((r) => [r.couponId, r]),
    );
  const before = read();
  change();
  refreshResults(tx, couponIds);
  const after = read();
  const moved: MovedResult[] = [];
  for (const [couponId, a] of after) {
    const b = before.get(couponId);
    const keys = MOVABLE.filter((k) => (b?.[k] ?? null) !== (a[k] ?? null));
    if (keys.length)
      moved.push({ couponId, before: Object.fromEntries(keys.map((k) => [k, b?.[k] ?? null])), after: Object.fromEntries(keys.map((k) => [k, a[k] ?? null])) });
  }
  return moved;
}
