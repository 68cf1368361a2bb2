import { getTableColumns, sql } from 'drizzle-orm';
import type { Db } from '../db/client';
import { getTableConfig } from 'drizzle-orm/sqlite-core';
import { couponResults, type CouponResultValues } from '../db/schema/results';
import type { CheckStage, CouponRole, HardnessScale } from '../../shared/constants/records';
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
const WEIGHINGS_SQL = `select w.coupon_id as couponId, w.stage, w.mass_g as massG, w.measured_at as measuredAt from weighings w`;
const CHECKS_SQL = `
  select k.coupon_id as couponId, k.kind, k.stage, k.measured_at as measuredAt, k.length_mm as lengthMm, k.width_mm as widthMm,
         k.thickness_mm as thicknessMm, k.volume_cm3 as volumeCm3, k.hardness_value as hardnessValue, k.hardness_scale as hardnessScale,
         k.moisture_pct as moisturePct
  from checks k`;
const IDS = `(select value from json_each(?))`;

interface RawKeys extends Omit<ResultKeys, 'role'> {
  role: string;
}
interface RawWeighing {
  couponId: number;
  stage: string;
  massG: number;
  measuredAt: string;
}
interface RawCheck extends Omit<StoredCheck, 'kind' | 'stage' | 'hardnessScale'> {
  kind: string;
  stage: string;
  hardnessScale: string | null;
}

// Prepared once per connection (server/db/prepared.ts); re-exported for the module's callers.
export { client, prepared } from '../db/prepared';
import { client, prepared } from '../db/prepared';

function groupBy<T extends { couponId: number }>(rows: T[]): Map<number, T[]> {
  const out = new Map<number, T[]>();
  for (const r of rows) {
    const list = out.get(r.couponId);
    if (list) list.push(r);
    else out.set(r.couponId, [r]);
  }
  return out;
}

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
const WEIGHING_COLUMNS = VALUE_COLUMNS.filter((c) => !CHECKS_ONLY.has(c.key));
const UPDATE_WEIGHINGS_SQL = `update coupon_results set ${WEIGHING_COLUMNS.map((c) => `${c.name} = ?`).join(', ')}
  where coupon_id = ? and ${KEY_COLUMNS.map((c) => `${c.name} is ?`).join(' and ')}`;

/** How each bound column is read from a computed row: its key, and whether it is stored as JSON text. */
type Binder = { key: string; json: boolean }[];
const binder = (cols: { key: string }[]): Binder => cols.map((c) => ({ key: c.key, json: c.key === 'hardness' || c.key === 'problems' }));
const ALL_BINDER = binder(COLUMNS);
const KEY_BINDER = binder(KEY_COLUMNS);
const VALUE_BINDER = binder(VALUE_COLUMNS);
const WEIGHING_BINDER = binder(WEIGHING_COLUMNS);

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

function writeRows(tx: Db, keys: RawKeys[], ws: Map<number, RawWeighing[]>, cs: Map<number, RawCheck[]>, fresh = false, weighingsOnly = false): number {
  const upsert = prepared(tx, UPSERT_SQL);
  const update = prepared(tx, weighingsOnly ? UPDATE_WEIGHINGS_SQL : UPDATE_SQL);
  const values = weighingsOnly ? WEIGHING_BINDER : VALUE_BINDER;
  for (const k of keys) {
    // The raw rows are passed as they are (their stage, kind and scale strings are the stored enums); the
    // extra couponId field is not read.
    const row = resultValues(
      k as unknown as ResultKeys,
      (ws.get(k.couponId) ?? NONE) as unknown as readonly WeighingReading[],
      (cs.get(k.couponId) ?? NONE) as unknown as readonly CheckReading[],
    );
    if (fresh || update.run(updateBindable(row, values)).changes === 0) upsert.run(bindable(row));
  }
  return keys.length;
}

/**
 * Recomputes the results rows of these coupons from their current readings and keys. Call it inside
 * the transaction of the change (every write of server/measurements does; a feature that moves a
 * coupon between runs, changes its species or role, or creates coupons calls it for those coupons).
 *
 * `weighingsOnly`: the change since these rows were last written added or removed weighings and nothing
 * else, so the columns computed from checks alone are left as stored (the table is always current, so
 * they already hold what a full refresh would write); a row whose indexed keys moved, or a missing row,
 * is still written in full.
 */
export function refreshResults(tx: Db, couponIds: readonly number[], options: { weighingsOnly?: boolean } = {}): number {
  if (couponIds.length === 0) return 0;
  const unique = couponIds.length === 1 ? couponIds : [...new Set(couponIds)];
  const only = options.weighingsOnly === true;
  if (unique.length <= REFRESH_CHUNK) return refreshSome(tx, unique, only);
  // An import's 100,000 coupons in slices (same transaction, same rows): their readings, keys and computed
  // rows are never all in memory at once.
  let n = 0;
  for (let from = 0; from < unique.length; from += REFRESH_CHUNK) n += refreshSome(tx, unique.slice(from, from + REFRESH_CHUNK), only);
  return n;
}

/** Coupons whose results are recomputed per slice of a large refresh. */
const REFRESH_CHUNK = 10_000;

function refreshSome(tx: Db, unique: readonly number[], weighingsOnly: boolean): number {
  const ids = JSON.stringify(unique);
  const keys = prepared(tx, `${KEYS_SQL} where c.id in ${IDS}`).all(ids) as RawKeys[];
  const ws = prepared(tx, `${WEIGHINGS_SQL} where w.coupon_id in ${IDS} and w.superseded_by is null and w.deleted_at is null order by w.measured_at, w.id`).all(
    ids,
  ) as RawWeighing[];
  const cs = prepared(tx, `${CHECKS_SQL} where k.coupon_id in ${IDS} and k.superseded_by is null and k.deleted_at is null order by k.measured_at, k.id`).all(
    ids,
  ) as RawCheck[];
  return writeRows(tx, keys, groupBy(ws), groupBy(cs), false, weighingsOnly);
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
  const keys = c.prepare(`${KEYS_SQL} order by c.id`).all() as RawKeys[];
  const ws = c.prepare(`${WEIGHINGS_SQL} where w.superseded_by is null and w.deleted_at is null order by w.measured_at, w.id`).all() as RawWeighing[];
  const cs = c.prepare(`${CHECKS_SQL} where k.superseded_by is null and k.deleted_at is null order by k.measured_at, k.id`).all() as RawCheck[];
  return writeRows(tx, keys, groupBy(ws), groupBy(cs), true);
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
