import { and, asc, count, desc, eq, inArray, like, or, sql, type SQL } from 'drizzle-orm';
import type { SQLiteColumn } from 'drizzle-orm/sqlite-core';
import type { Db } from '../../db/client';
import { coupons } from '../../db/schema/coupons';
import { couponResults } from '../../db/schema/results';
import { resins, species } from '../../db/schema/reference';
import { trialConditions, trials } from '../../db/schema/trials';
import { runs } from '../../db/schema/runs';
import type { TrialListQuery } from '../../../shared/schemas/trials';
import type { Option, OptionsQuery } from '../../../shared/schemas/options';

export type TrialRow = typeof trials.$inferSelect;
export type ConditionRow = typeof trialConditions.$inferSelect;
export type CouponRow = typeof coupons.$inferSelect;

const likeEscaped = (col: SQLiteColumn, q: string) => sql`${col} like ${`%${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`} escape '\\'`;

function orderOf(sort: string | undefined): SQL[] {
  const fallback = [desc(trials.createdAt), desc(trials.id)];
  if (!sort) return fallback;
  const cols: Record<string, SQLiteColumn> = { code: trials.code, title: trials.title, status: trials.status, createdAt: trials.createdAt };
  const col = cols[sort.replace(/^-/, '')];
  if (!col) return fallback;
  return [sort.startsWith('-') ? desc(col) : asc(col), ...fallback];
}

export function listTrials(db: Db, q: TrialListQuery) {
  const where = and(
    q.q ? or(likeEscaped(trials.code, q.q), likeEscaped(trials.title, q.q), likeEscaped(trials.question, q.q)) : undefined,
    q.status ? eq(trials.status, q.status) : undefined,
  );
  const rows = db
    .select({ trial: trials })
    .from(trials)
    .where(where)
    .orderBy(...orderOf(q.sort))
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize)
    .all();
  const total = db.select({ n: count() }).from(trials).where(where).get()?.n ?? 0;
  return { rows, total };
}

export function findTrial(db: Db, id: number): TrialRow | undefined {
  return db.select().from(trials).where(eq(trials.id, id)).get();
}
export function findTrialByCode(db: Db, code: string): TrialRow | undefined {
  return db.select().from(trials).where(eq(trials.code, code)).get();
}
/** Codes of the year, e.g. every `T26-%`, for the next counter. */
export function trialCodesLike(db: Db, prefix: string): string[] {
  return db
    .select({ code: trials.code })
    .from(trials)
    .where(like(trials.code, `${prefix}%`))
    .all()
    .map((r) => r.code);
}
export function insertTrial(db: Db, values: typeof trials.$inferInsert): TrialRow {
  return db.insert(trials).values(values).returning().get();
}
export function updateTrialRow(db: Db, id: number, values: Partial<typeof trials.$inferInsert>): TrialRow {
  return db.update(trials).set(values).where(eq(trials.id, id)).returning().get();
}

export type ConditionWithNames = ConditionRow & { speciesName: string; resinName: string; cureMinC: number; cureMaxC: number };

export function conditionsOf(db: Db, trialId: number): ConditionWithNames[] {
  return db
    .select({ c: trialConditions, speciesName: species.commonName, resinName: resins.name, cureMinC: resins.cureMinC, cureMaxC: resins.cureMaxC })
    .from(trialConditions)
    .innerJoin(species, eq(species.id, trialConditions.speciesId))
    .innerJoin(resins, eq(resins.id, trialConditions.resinId))
    .where(eq(trialConditions.trialId, trialId))
    .orderBy(asc(trialConditions.id))
    .all()
    .map((r) => ({ ...r.c, speciesName: r.speciesName, resinName: r.resinName, cureMinC: r.cureMinC, cureMaxC: r.cureMaxC }));
}
export function insertCondition(db: Db, values: typeof trialConditions.$inferInsert): ConditionRow {
  return db.insert(trialConditions).values(values).returning().get();
}
export function updateConditionRow(db: Db, id: number, values: Partial<typeof trialConditions.$inferInsert>): void {
  db.update(trialConditions).set(values).where(eq(trialConditions.id, id)).run();
}
export function deleteConditions(db: Db, ids: number[]): void {
  if (ids.length) db.delete(trialConditions).where(inArray(trialConditions.id, ids)).run();
}

export function speciesNames(db: Db, ids: number[]): Map<number, string> {
  if (ids.length === 0) return new Map();
  return new Map(
    db
      .select({ id: species.id, name: species.commonName })
      .from(species)
      .where(inArray(species.id, ids))
      .all()
      .map((r) => [r.id, r.name]),
  );
}
export function resinsById(db: Db, ids: number[]): Map<number, { name: string; cureMinC: number; cureMaxC: number }> {
  if (ids.length === 0) return new Map();
  return new Map(
    db
      .select({ id: resins.id, name: resins.name, cureMinC: resins.cureMinC, cureMaxC: resins.cureMaxC })
      .from(resins)
      .where(inArray(resins.id, ids))
      .all()
      .map((r) => [r.id, { name: r.name, cureMinC: r.cureMinC, cureMaxC: r.cureMaxC }]),
  );
}

export function couponsOfTrial(db: Db, trialId: number): CouponRow[] {
  return db.select().from(coupons).where(eq(coupons.trialId, trialId)).orderBy(asc(coupons.id)).all();
}
export function tagsWithPrefix(db: Db, prefix: string): Set<string> {
  return new Set(
    db
      .select({ tag: coupons.tag })
      .from(coupons)
      .where(like(coupons.tag, `${prefix}%`))
      .all()
      .map((r) => r.tag),
  );
}
export function insertCoupon(db: Db, values: typeof coupons.$inferInsert): CouponRow {
  return db.insert(coupons).values(values).returning().get();
}
export function couponCountsByCondition(db: Db, conditionIds: number[]): Map<number, number> {
  if (conditionIds.length === 0) return new Map();
  return new Map(
    db
      .select({ id: coupons.conditionId, n: count() })
      .from(coupons)
      .where(inArray(coupons.conditionId, conditionIds))
      .groupBy(coupons.conditionId)
      .all()
      .map((r) => [r.id ?? 0, r.n]),
  );
}

const liveWeighing = (stage: 'dry' | 'cured') =>
  sql<number>`sum(case when exists (select 1 from weighings w where w.coupon_id = "coupons"."id" and w.stage = ${stage} and w.superseded_by is null and w.deleted_at is null) then 1 else 0 end)`;

/** Coupons created, dry-weighed and cured-weighed, grouped by condition (treated) or species (controls). */
export function progressRows(db: Db, trialId: number) {
  return db
    .select({
      conditionId: coupons.conditionId,
      speciesId: coupons.speciesId,
      role: coupons.role,
      created: count(),
      dryWeighed: liveWeighing('dry'),
      curedWeighed: liveWeighing('cured'),
    })
    .from(coupons)
    .where(eq(coupons.trialId, trialId))
    .groupBy(coupons.conditionId, coupons.speciesId, coupons.role)
    .all();
}

/** The runs the trial's coupons went through, with how many of its coupons each holds, oldest first. */
export function runsOfTrial(db: Db, trialId: number): { id: number; code: string; couponCount: number }[] {
  return db
    .select({ id: runs.id, code: runs.code, couponCount: count() })
    .from(coupons)
    .innerJoin(runs, eq(coupons.runId, runs.id))
    .where(eq(coupons.trialId, trialId))
    .groupBy(runs.id, runs.code)
    .orderBy(asc(runs.id))
    .all();
}

/** Coupons of a trial with what a label needs. */
export function labelRows(db: Db, trialId: number) {
  return db
    .select({
      id: coupons.id,
      tag: coupons.tag,
      role: coupons.role,
      speciesName: species.commonName,
      resinName: resins.name,
      processLabel: trialConditions.processLabel,
    })
    .from(coupons)
    .innerJoin(species, eq(species.id, coupons.speciesId))
    .leftJoin(trialConditions, eq(trialConditions.id, coupons.conditionId))
    .leftJoin(resins, eq(resins.id, trialConditions.resinId))
    .where(eq(coupons.trialId, trialId))
    .orderBy(asc(coupons.id))
    .all();
}

const inIds = (col: SQLiteColumn, ids: readonly number[]) => sql`${col} in (select value from json_each(${JSON.stringify(ids)}))`;

/** Per trial: its conditions, distinct species and resins in the grid, and the treated coupons it plans. */
export function gridCountsOf(db: Db, trialIds: number[]) {
  if (trialIds.length === 0) return new Map<number, { conditions: number; species: number; resins: number; wanted: number }>();
  const rows = db
    .select({
      trialId: trialConditions.trialId,
      conditions: count(),
      species: sql<number>`count(distinct ${trialConditions.speciesId})`,
      resins: sql<number>`count(distinct ${trialConditions.resinId})`,
      wanted: sql<number>`coalesce(sum(${trialConditions.couponsWanted}), 0)`,
    })
    .from(trialConditions)
    .where(inIds(trialConditions.trialId, trialIds))
    .groupBy(trialConditions.trialId)
    .all();
  return new Map(rows.map((r) => [r.trialId, r]));
}

/**
 * Per trial, from the results table in one grouped query: coupons created, and coupons done (a treated
 * coupon of a condition once weighed after cure, an untreated control once weighed dry), counted as the
 * trial page counts them.
 */
export function couponCountsOf(db: Db, trialIds: number[]) {
  if (trialIds.length === 0) return new Map<number, { created: number; done: number }>();
  const r = couponResults;
  const rows = db
    .select({
      trialId: r.trialId,
      created: count(),
      done: sql<number>`coalesce(sum(case when (${r.conditionId} is not null and ${r.curedMassG} is not null) or (${r.conditionId} is null and ${r.role} = 'control' and ${r.dryMassG} is not null) then 1 else 0 end), 0)`,
    })
    .from(r)
    .where(inIds(r.trialId, trialIds))
    .groupBy(r.trialId)
    .all();
  return new Map(rows.map((x) => [x.trialId as number, { created: x.created, done: Number(x.done) }]));
}

/** The picker's light list: id, code and a label, newest first. */
export function trialOptions(db: Db, q: OptionsQuery): Option[] {
  const rows = db
    .select({ id: trials.id, code: trials.code, title: trials.title })
    .from(trials)
    .where(q.q ? or(likeEscaped(trials.code, q.q), likeEscaped(trials.title, q.q)) : undefined)
    .orderBy(desc(trials.createdAt), desc(trials.id))
    .limit(q.limit)
    .all();
  return rows.map((t) => ({ id: t.id, code: t.code, label: `${t.code} · ${t.title}` }));
}
