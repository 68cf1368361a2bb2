import { and, asc, count, desc, eq, inArray, isNull, or, sql, type SQL } from 'drizzle-orm';
import { alias, type SQLiteColumn, type SQLiteSelect } from 'drizzle-orm/sqlite-core';
import { couponResults } from '../../db/schema/results';
import type { Db } from '../../db/client';
import { auditLog } from '../../db/schema/admin';
import { users } from '../../db/schema/auth';
import { checks, coupons, photos, weighings } from '../../db/schema/coupons';
import { resinLots, resins, species } from '../../db/schema/reference';
import { runs } from '../../db/schema/runs';
import { trialConditions, trials } from '../../db/schema/trials';
import type { PhotoOut } from '../../../shared/schemas/runs';
import { toPhotoOut } from '../../db/photo-out';
import { COUPON_SORTS, type CouponExportQuery, type CouponWaitingFor } from '../../../shared/schemas/coupons';

export type CouponRow = typeof coupons.$inferSelect;
export type WeighingRow = typeof weighings.$inferSelect;
export type CheckRow = typeof checks.$inferSelect;
export type SpeciesRow = typeof species.$inferSelect;
export type ResinRow = typeof resins.$inferSelect;
export type PhotoRow = typeof photos.$inferSelect;

export interface CouponWithNames {
  coupon: CouponRow;
  speciesName: string;
  trialCode: string | null;
  runCode: string | null;
  /** The trial condition's process settings name and planned resin; null outside a condition. */
  processLabel: string | null;
  plannedResinId: number | null;
  plannedResinName: string | null;
  conditionSpeciesName: string | null;
}

// The condition's resin is the plan; the resin a coupon went through (its run's lot) may differ.
const plannedResins = alias(resins, 'planned_resins');
const conditionSpecies = alias(species, 'condition_species');

/**
 * The joins that name a coupon's species, trial, run and condition (with the condition's planned resin and
 * species) and bring its results row, shared by the single coupon, the list's light rows and the full
 * page. Applied to a dynamic query, so the rows are typed by the caller (CouponWithNames, CouponListDbRow).
 */
function joinNames<T extends SQLiteSelect>(q: T) {
  return q
    .innerJoin(species, eq(coupons.speciesId, species.id))
    .leftJoin(trials, eq(coupons.trialId, trials.id))
    .leftJoin(runs, eq(coupons.runId, runs.id))
    .leftJoin(trialConditions, eq(coupons.conditionId, trialConditions.id))
    .leftJoin(plannedResins, eq(trialConditions.resinId, plannedResins.id))
    .leftJoin(conditionSpecies, eq(trialConditions.speciesId, conditionSpecies.id))
    .leftJoin(couponResults, eq(couponResults.couponId, coupons.id));
}

const NAMES = {
  coupon: coupons,
  speciesName: species.commonName,
  trialCode: trials.code,
  runCode: runs.code,
  processLabel: trialConditions.processLabel,
  plannedResinId: plannedResins.id,
  plannedResinName: plannedResins.name,
  conditionSpeciesName: conditionSpecies.commonName,
};

function withNames(db: Db, where: SQL | undefined): CouponWithNames[] {
  return joinNames(db.select(NAMES).from(coupons).$dynamic()).where(where).all() as CouponWithNames[];
}

export function findCoupon(db: Db, id: number): CouponWithNames | undefined {
  return withNames(db, eq(coupons.id, id))[0];
}

export function findCouponByTag(db: Db, tag: string): CouponRow | undefined {
  return db.select().from(coupons).where(eq(coupons.tag, tag)).get();
}

/** `col in (ids)` with the ids bound as one JSON array, so a long list never runs out of SQL variables. */
const inIds = (col: SQLiteColumn, ids: readonly number[]) => sql`${col} in (select value from json_each(${JSON.stringify(ids)}))`;

/**
 * The sortable columns. A blank metric goes last whichever way the list is sorted, as in a spreadsheet: a
 * shop sorting by dry SG wants the coupons that have one first. It is coalesced to the far end of the sort
 * (±1e308) rather than left NULL, so a keyset cursor never meets a NULL.
 */
const metric =
  (col: SQLiteColumn) =>
  (desc_: boolean): SQL =>
    sql`coalesce(${col}, ${sql.raw(desc_ ? '-1e308' : '1e308')})`;
const SORTS: Record<(typeof COUPON_SORTS)[number], (desc_: boolean) => SQL | SQLiteColumn> = {
  id: () => coupons.id,
  tag: () => coupons.tag,
  createdAt: () => coupons.createdAt,
  drySg: metric(couponResults.drySg),
  wpgPct: metric(couponResults.wpgPct),
  resinLoadingKgM3: metric(couponResults.resinLoadingKgM3),
};

/** The list's sort (metrics: blanks last either way), its direction and its ORDER BY (ties on the id). */
function sortOf(sort: string | undefined) {
  const key = (sort ?? 'tag').replace(/^-/, '') as (typeof COUPON_SORTS)[number];
  const desc_ = sort?.startsWith('-') ?? false;
  const expr: SQL | SQLiteColumn = (SORTS[key] ?? SORTS.tag)(desc_);
  return { expr, desc: desc_, order: [desc_ ? desc(expr) : asc(expr), asc(coupons.id)], byMetric: !['id', 'tag', 'createdAt'].includes(key) && key in SORTS };
}

/** The list's WHERE (shared by the page, the count and the CSV export); says whether it reads the results table. */
/** How a filter value enters the SQL: as itself, or as a named placeholder of a prepared statement. */
type Bind = (name: string, value: string | number) => unknown;
const inline: Bind = (_name, value) => value;

function listWhere(q: CouponExportQuery, bind: Bind = inline): { where: SQL | undefined; needsResults: boolean } {
  const r = couponResults;
  const waiting: Record<CouponWaitingFor, SQL | undefined> = {
    'dry-weighing': isNull(r.dryMassG),
    'soaked-weighing': and(eq(coupons.role, 'treated'), isNull(r.soakedMassG)),
    'cured-weighing': and(eq(coupons.role, 'treated'), isNull(r.curedMassG)),
    'dry-dimensions': and(isNull(r.dryThicknessMm), isNull(r.dryVolumeCm3)),
  };
  const filters = [
    q.runId === undefined ? undefined : sql`${coupons.runId} = ${bind('runId', q.runId)}`,
    q.trialId === undefined ? undefined : sql`${coupons.trialId} = ${bind('trialId', q.trialId)}`,
    q.speciesId === undefined ? undefined : sql`${coupons.speciesId} = ${bind('speciesId', q.speciesId)}`,
    q.conditionId === undefined ? undefined : sql`${coupons.conditionId} = ${bind('conditionId', q.conditionId)}`,
    q.role === undefined ? undefined : sql`${coupons.role} = ${bind('role', q.role)}`,
    q.q ? sql`${coupons.tag} like ${bind('q', `%${q.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`)} escape '\\'` : undefined,
    q.waitingFor ? waiting[q.waitingFor] : undefined,
  ].filter((f) => f !== undefined);
  return { where: filters.length ? and(...filters) : undefined, needsResults: q.waitingFor !== undefined };
}

/** A page of the list: the filters, the sort, and either a keyset cursor (sort value, id) or an offset. */
export interface CouponPageArgs {
  filters: CouponExportQuery;
  after: [string | number, number] | null;
  limit: number;
  offset: number;
}

/** WHERE and ORDER BY of a page; keyset: rows after the cursor in (sort value, id) order, so a page far down costs what the first one does. */
function pagePlan(a: CouponPageArgs, bind: Bind = inline) {
  const { where, needsResults } = listWhere(a.filters, bind);
  const s = sortOf(a.filters.sort);
  let after: SQL | undefined;
  if (a.after) {
    const [v, id] = a.after;
    // The leading `>=` (or `<=`) bound lets SQLite seek the sort's index: with bound values it does not
    // see through the OR alone and scanned the whole index (page 1,000 by cursor: 4.7 ms against 0.02 ms).
    after = s.desc
      ? sql`(${s.expr} <= ${bind('afterValue', v)} and (${s.expr} < ${bind('afterValue', v)} or (${s.expr} = ${bind('afterValue', v)} and ${coupons.id} > ${bind('afterId', id)})))`
      : sql`(${s.expr} >= ${bind('afterValue', v)} and (${s.expr} > ${bind('afterValue', v)} or (${s.expr} = ${bind('afterValue', v)} and ${coupons.id} > ${bind('afterId', id)})))`;
  }
  return {
    where,
    needsResults,
    pageWhere: and(where, after),
    order: s.order,
    offset: a.after ? 0 : a.offset,
    sortExpr: s.expr,
    keyset: a.after !== null,
    readsResults: needsResults || s.byMetric,
  };
}

/**
 * A page of the coupon list as light rows: keys, names and the list's figures from the results table, with
 * each row's sort value (for the next cursor), in one query. Filters and sorts on the coupon's own columns
 * use its indexes (`(trial_id, tag)`, `(run_id, tag)`, `(created_at, id)`); readings and metrics come from the
 * results table, joined by its primary key.
 */
/** The light row's columns, in the order the page query selects them (rows come back as arrays in this order). */
const lightSelection = (sortExpr: SQL | SQLiteColumn) => ({
  id: coupons.id,
  tag: coupons.tag,
  trialId: coupons.trialId,
  trialCode: trials.code,
  conditionId: coupons.conditionId,
  processLabel: trialConditions.processLabel,
  plannedResinId: plannedResins.id,
  plannedResinName: plannedResins.name,
  conditionSpeciesName: conditionSpecies.commonName,
  speciesId: coupons.speciesId,
  speciesName: species.commonName,
  role: coupons.role,
  sourceBoard: coupons.sourceBoard,
  runId: coupons.runId,
  runCode: runs.code,
  createdAt: coupons.createdAt,
  dryMassG: couponResults.dryMassG,
  soakedMassG: couponResults.soakedMassG,
  curedMassG: couponResults.curedMassG,
  drySg: couponResults.drySg,
  wpgPct: couponResults.wpgPct,
  resinLoadingKgM3: couponResults.resinLoadingKgM3,
  voidFillPct: couponResults.voidFillPct,
  problemCount: sql<number>`coalesce(${couponResults.problemCount}, 0)`,
  firstProblem: sql<string | null>`json_extract(${couponResults.problems}, '$[0].message')`,
  sortValue: sql<string | number | null>`${sortExpr}`,
});

function lightPageQuery(db: Db, p: ReturnType<typeof pagePlan>) {
  const q = joinNames(db.select(lightSelection(p.sortExpr)).from(coupons).$dynamic());
  if (p.keyset)
    return q
      .where(p.pageWhere)
      .orderBy(...p.order)
      .limit(sql.placeholder('limit'))
      .prepare();
  // An offset page picks its ids first, over the coupon's own index (and the results table only when the
  // filter or sort needs it), then names just those rows: otherwise SQLite joins every skipped row, and
  // page 1,000 of 50 cost 60 ms instead of 2 ms. Far pages should still use the keyset cursor.
  const ids = db.select({ id: coupons.id }).from(coupons).$dynamic();
  const picked = (p.readsResults ? ids.leftJoin(couponResults, eq(couponResults.couponId, coupons.id)) : ids)
    .where(p.pageWhere)
    .orderBy(...p.order)
    .limit(sql.placeholder('limit'))
    .offset(sql.placeholder('offset'));
  return q
    .where(inArray(coupons.id, picked))
    .orderBy(...p.order)
    .prepare();
}
type LightPage = ReturnType<typeof lightPageQuery>;
export type CouponListDbRow = ReturnType<LightPage['all']>[number];
/**
 * Prepared list statements per database and query shape (sort, which filters, keyset or not): the list is
 * the busiest read, and building its SQL with every join cost about four times running it. Rows come back
 * as arrays and are named here by the selection's order: drizzle's per-column mapping cost more than the
 * query itself.
 */
const lightPages = new WeakMap<Db, Map<string, { page: LightPage; count: ReturnType<typeof countQuery>; keys: string[] }>>();

function countQuery(db: Db, p: ReturnType<typeof pagePlan>) {
  const q = db.select({ n: count() }).from(coupons);
  return (p.needsResults ? q.leftJoin(couponResults, eq(couponResults.couponId, coupons.id)) : q).where(p.where).prepare();
}

/** A page of light rows and the number of coupons the filters match, through the statements of the query's shape. */
export function listCouponRows(db: Db, a: CouponPageArgs): { rows: CouponListDbRow[]; total: number } {
  const params: Record<string, unknown> = { limit: a.limit };
  const names: string[] = [];
  const p = pagePlan(a, (name, value) => {
    params[name] = value;
    if (!names.includes(name)) names.push(name);
    return sql.placeholder(name);
  });
  params.offset = p.offset;
  const shape = JSON.stringify([a.filters.sort ?? 'tag', a.filters.waitingFor ?? null, names]);
  let cache = lightPages.get(db);
  if (!cache) lightPages.set(db, (cache = new Map()));
  let q = cache.get(shape);
  if (!q) {
    const page = lightPageQuery(db, p);
    q = { page, count: countQuery(db, p), keys: Object.keys(lightSelection(p.sortExpr)) };
    cache.set(shape, q);
  }
  const keys = q.keys;
  const rows = (q.page.values(params) as unknown[][]).map((values) => {
    const row: Record<string, unknown> = {};
    for (let i = 0; i < keys.length; i++) row[keys[i] as string] = values[i];
    return row as CouponListDbRow;
  });
  return { rows, total: q.count.get(params)?.n ?? 0 };
}

/** The same page with every coupon's own row and names, for the full answers the entry grid reads; with each row's sort value. */
export function listCouponsWithNames(db: Db, a: CouponPageArgs): (CouponWithNames & { sortValue: string | number | null })[] {
  const p = pagePlan(a);
  return joinNames(
    db
      .select({ ...NAMES, sortValue: sql<string | number | null>`${p.sortExpr}` })
      .from(coupons)
      .$dynamic(),
  )
    .where(p.pageWhere)
    .orderBy(...p.order)
    .limit(a.limit)
    .offset(p.offset)
    .all() as (CouponWithNames & { sortValue: string | number | null })[];
}

/** How many coupons match the list's filters; joins the results table only when a filter needs it. */
export function countCoupons(db: Db, filters: CouponExportQuery): number {
  const { where, needsResults } = listWhere(filters);
  const q = db.select({ n: count() }).from(coupons);
  return (needsResults ? q.leftJoin(couponResults, eq(couponResults.couponId, coupons.id)) : q).where(where).get()?.n ?? 0;
}

/** Coupons with their keys, current readings and metrics from the results table, for the CSV export. */
export function exportCouponRows(db: Db, filters: CouponExportQuery, limit: number, offset: number) {
  const { where } = listWhere(filters);
  const { order } = sortOf(filters.sort);
  return db
    .select({
      coupon: { id: coupons.id, tag: coupons.tag, role: coupons.role, sourceBoard: coupons.sourceBoard, notes: coupons.notes, createdAt: coupons.createdAt },
      speciesName: species.commonName,
      trialCode: trials.code,
      runCode: runs.code,
      processLabel: trialConditions.processLabel,
      resinName: resins.name,
      r: couponResults,
    })
    .from(coupons)
    .innerJoin(species, eq(coupons.speciesId, species.id))
    .leftJoin(trials, eq(coupons.trialId, trials.id))
    .leftJoin(runs, eq(coupons.runId, runs.id))
    .leftJoin(trialConditions, eq(coupons.conditionId, trialConditions.id))
    .leftJoin(couponResults, eq(couponResults.couponId, coupons.id))
    .leftJoin(resins, eq(couponResults.resinId, resins.id))
    .where(where)
    .orderBy(...order)
    .limit(limit)
    .offset(offset)
    .all();
}

/**
 * Control coupons of these trial × species pairs, for the anti-swell comparison: found through the
 * results table's (role, species) index, the few controls, then matched to the pairs.
 */
export function controlsFor(db: Db, pairs: { trialId: number; speciesId: number }[]): CouponWithNames[] {
  if (pairs.length === 0) return [];
  const wanted = new Set(pairs.map((p) => `${p.trialId}|${p.speciesId}`));
  const ids = db
    .select({ id: couponResults.couponId, trialId: couponResults.trialId, speciesId: couponResults.speciesId })
    .from(couponResults)
    .where(and(eq(couponResults.role, 'control'), inIds(couponResults.speciesId, [...new Set(pairs.map((p) => p.speciesId))])))
    .all()
    .filter((c) => wanted.has(`${c.trialId}|${c.speciesId}`))
    .map((c) => c.id);
  if (ids.length === 0) return [];
  return withNames(db, inIds(coupons.id, ids));
}

const currentWeighing = and(isNull(weighings.supersededBy), isNull(weighings.deletedAt));
const currentCheck = and(isNull(checks.supersededBy), isNull(checks.deletedAt));

export function currentWeighings(db: Db, couponIds: number[]): WeighingRow[] {
  if (couponIds.length === 0) return [];
  return db
    .select()
    .from(weighings)
    .where(and(inIds(weighings.couponId, couponIds), currentWeighing))
    .orderBy(asc(weighings.measuredAt), asc(weighings.id))
    .all();
}

export function currentChecks(db: Db, couponIds: number[]): CheckRow[] {
  if (couponIds.length === 0) return [];
  return db
    .select()
    .from(checks)
    .where(and(inIds(checks.couponId, couponIds), currentCheck))
    .orderBy(asc(checks.measuredAt), asc(checks.id))
    .all();
}

export function allWeighings(db: Db, couponId: number): WeighingRow[] {
  return db.select().from(weighings).where(eq(weighings.couponId, couponId)).orderBy(asc(weighings.id)).all();
}

export function allChecks(db: Db, couponId: number): CheckRow[] {
  return db.select().from(checks).where(eq(checks.couponId, couponId)).orderBy(asc(checks.id)).all();
}

export function findWeighing(db: Db, id: number): WeighingRow | undefined {
  return db.select().from(weighings).where(eq(weighings.id, id)).get();
}

export function findCheck(db: Db, id: number): CheckRow | undefined {
  return db.select().from(checks).where(eq(checks.id, id)).get();
}

export function speciesByIds(db: Db, ids: number[]): Map<number, SpeciesRow> {
  if (ids.length === 0) return new Map();
  return new Map(
    db
      .select()
      .from(species)
      .where(inArray(species.id, ids))
      .all()
      .map((s) => [s.id, s]),
  );
}

export function findSpecies(db: Db, id: number): SpeciesRow | undefined {
  return db.select().from(species).where(eq(species.id, id)).get();
}

export function findTrial(db: Db, id: number) {
  return db.select().from(trials).where(eq(trials.id, id)).get();
}

export function findCondition(db: Db, id: number) {
  return db.select().from(trialConditions).where(eq(trialConditions.id, id)).get();
}

export function findRunRow(db: Db, id: number) {
  return db.select().from(runs).where(eq(runs.id, id)).get();
}

/**
 * The resin each coupon went through: its run's lot's resin; before it is in a run, the resin its
 * trial condition plans for it.
 */
export function resinsFor(db: Db, rows: CouponRow[]): Map<number, ResinRow> {
  const out = new Map<number, ResinRow>();
  const runIds = [...new Set(rows.map((r) => r.runId).filter((x): x is number => x !== null))];
  const byRun = new Map<number, ResinRow>();
  if (runIds.length) {
    const rr = db
      .select({ runId: runs.id, resin: resins })
      .from(runs)
      .innerJoin(resinLots, eq(runs.resinLotId, resinLots.id))
      .innerJoin(resins, eq(resinLots.resinId, resins.id))
      .where(inArray(runs.id, runIds))
      .all();
    for (const r of rr) byRun.set(r.runId, r.resin);
  }
  const condIds = [...new Set(rows.map((r) => r.conditionId).filter((x): x is number => x !== null))];
  const byCond = new Map<number, ResinRow>();
  if (condIds.length) {
    const cr = db
      .select({ conditionId: trialConditions.id, resin: resins })
      .from(trialConditions)
      .innerJoin(resins, eq(trialConditions.resinId, resins.id))
      .where(inArray(trialConditions.id, condIds))
      .all();
    for (const r of cr) byCond.set(r.conditionId, r.resin);
  }
  for (const c of rows) {
    const resin = (c.runId !== null ? byRun.get(c.runId) : undefined) ?? (c.conditionId !== null ? byCond.get(c.conditionId) : undefined);
    if (resin) out.set(c.id, resin);
  }
  return out;
}

export function photosOf(db: Db, couponId: number): PhotoOut[] {
  return db.select().from(photos).where(eq(photos.couponId, couponId)).orderBy(asc(photos.id)).all().map(toPhotoOut);
}

export function findPhoto(db: Db, id: number): PhotoRow | undefined {
  return db.select().from(photos).where(eq(photos.id, id)).get();
}

/** Audit entries about a coupon, its readings and its photos, oldest first, with the actor's name and e-mail at the time. */
export function auditFor(db: Db, couponId: number, weighingIds: number[], checkIds: number[], photoIds: number[], importIds: number[] = []) {
  const of = (entity: string, ids: number[]) => (ids.length ? and(eq(auditLog.entity, entity), inArray(auditLog.entityId, ids.map(String))) : undefined);
  const conds = [
    and(eq(auditLog.entity, 'coupon'), eq(auditLog.entityId, String(couponId))),
    of('weighing', weighingIds),
    of('check', checkIds),
    of('photo', photoIds),
    // An import audits itself once (its rows carry the import's id), so a coupon's history shows the
    // commit and undo of each import that gave it readings.
    importIds.length ? and(of('import', importIds), inArray(auditLog.action, ['commit', 'undo'])) : undefined,
  ].filter((c): c is SQL => c !== undefined);
  return db
    .select({
      entry: auditLog,
      actorName: sql<string | null>`coalesce(${auditLog.actorName}, ${users.name})`,
      actorEmail: sql<string | null>`coalesce(${auditLog.actorEmail}, ${users.email})`,
    })
    .from(auditLog)
    .leftJoin(users, eq(auditLog.actorId, users.id))
    .where(or(...conds))
    .orderBy(asc(auditLog.id))
    .all();
}

/** When the shop's first record was made: its first account (the installation). */
export function shopFirstRecordAt(db: Db): string | null {
  return (
    db
      .select({ at: sql<string | null>`min(${users.createdAt})` })
      .from(users)
      .get()?.at ?? null
  );
}

export type CouponInsert = typeof coupons.$inferInsert;

/** A new coupon row, as stored. */
export function insertCoupon(db: Db, values: CouponInsert) {
  return db.insert(coupons).values(values).returning().get();
}

/** Changes a coupon's own fields (tag, species, role, board, notes, version); answers the row as stored. */
export function updateCouponRow(db: Db, id: number, values: Partial<CouponInsert>) {
  return db.update(coupons).set(values).where(eq(coupons.id, id)).returning().get();
}

/** A new photo row (of a coupon or a run), as stored. */
export function insertPhoto(db: Db, values: typeof photos.$inferInsert): PhotoRow {
  return db.insert(photos).values(values).returning().get();
}
