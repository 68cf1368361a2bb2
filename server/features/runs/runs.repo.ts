import { and, asc, count, desc, eq, exists, gte, inArray, isNotNull, isNull, like, not, or, sql, type SQL } from 'drizzle-orm';
import type { Option, OptionsQuery } from '../../../shared/schemas/options';
import type { SQLiteColumn } from 'drizzle-orm/sqlite-core';
import type { Db } from '../../db/client';
import { coupons, photos, weighings } from '../../db/schema/coupons';
import { couponResults } from '../../db/schema/results';
import { resinLots, resins } from '../../db/schema/reference';
import { runReadings, runStages, runs } from '../../db/schema/runs';
import type { ShopSettings } from '../../../shared/schemas/admin';
import { readShopSettings } from '../../db/shop-settings';
import { once, prepared } from '../../db/prepared';
import { toPhotoOut } from '../../db/photo-out';
import { RUN_STAGES, WEIGHING_STAGES, type RunStage, type WeighingStage } from '../../../shared/constants/records';
import type { PhotoOut, RunExportQuery } from '../../../shared/schemas/runs';

export type RunRow = typeof runs.$inferSelect;
export type StageRow = typeof runStages.$inferSelect;
export type ReadingRow = typeof runReadings.$inferSelect;

/** The shop settings merged over the defaults. */
export function getShopSettings(db: Db): ShopSettings {
  return readShopSettings(db);
}

export function findRun(db: Db, id: number): RunRow | undefined {
  return db.select().from(runs).where(eq(runs.id, id)).get();
}

export function findRunByCode(db: Db, code: string): RunRow | undefined {
  return db.select().from(runs).where(eq(runs.code, code)).get();
}

/** The stages of these runs: one statement prepared once, the ids bound as one JSON array. */
export function stagesOf(db: Db, runIds: number[]): StageRow[] {
  if (runIds.length === 0) return [];
  const q = once(db, 'runs.stagesOf', () =>
    db
      .select()
      .from(runStages)
      .where(sql`${runStages.runId} in (select value from json_each(${sql.placeholder('ids')}))`)
      .prepare(),
  );
  return q.all({ ids: JSON.stringify(runIds) });
}

export function readingsOf(db: Db, runId: number): ReadingRow[] {
  return db.select().from(runReadings).where(eq(runReadings.runId, runId)).orderBy(asc(runReadings.at), asc(runReadings.id)).all();
}

export interface LotWithResin {
  lot: typeof resinLots.$inferSelect;
  resin: typeof resins.$inferSelect;
}

export function findLot(db: Db, lotId: number): LotWithResin | undefined {
  const row = db
    .select({ lot: resinLots, resin: resins })
    .from(resinLots)
    .innerJoin(resins, eq(resinLots.resinId, resins.id))
    .where(eq(resinLots.id, lotId))
    .get();
  return row ?? undefined;
}

export function lotsByIds(db: Db, ids: number[]): Map<number, LotWithResin> {
  if (ids.length === 0) return new Map();
  const q = once(db, 'runs.lotsByIds', () =>
    db
      .select({ lot: resinLots, resin: resins })
      .from(resinLots)
      .innerJoin(resins, eq(resinLots.resinId, resins.id))
      .where(sql`${resinLots.id} in (select value from json_each(${sql.placeholder('ids')}))`)
      .prepare(),
  );
  const rows = q.all({ ids: JSON.stringify([...new Set(ids)]) });
  return new Map(rows.map((r) => [r.lot.id, r]));
}

/** What the run checks and the bench need to know about each coupon of a run. */
export interface RunCouponInfo {
  id: number;
  tag: string;
  role: 'treated' | 'control';
  runId: number;
  speciesId: number;
  speciesName: string;
  stagesWeighed: WeighingStage[];
  dryingChecks: { at: string; massG: number }[];
  thicknessMm: number | null;
}

/** `col in (ids)` with the ids bound as one JSON array, so a long list never runs out of SQL variables. */
export const inIds = (col: SQL | SQLiteColumn, ids: readonly number[]) => sql`${col} in (select value from json_each(${JSON.stringify(ids)}))`;

// Plain SQL, prepared once: a page of 50 runs of 500 coupons is 25,000 rows and 50,000 drying checks,
// and mapping them through drizzle cost five times running the queries.
const COUPONS_OF_RUNS = `select r.coupon_id as id, r.tag, r.role, r.run_id as runId, r.species_id as speciesId,
    s.common_name as speciesName, r.dry_mass_g as dry, r.soaked_mass_g as soaked, r.cured_mass_g as cured,
    r.wet_test_mass_g as wetTest, r.drying_check_count as dryingCheckCount, r.dry_thickness_mm as thicknessMm
  from coupon_results r join species s on s.id = r.species_id
  where r.run_id in (select value from json_each(?))
  order by r.tag`;
const DRYING_CHECKS_OF_RUNS = `select w.coupon_id as couponId, w.measured_at as at, w.mass_g as massG
  from weighings w join coupon_results r on r.coupon_id = w.coupon_id
  where r.run_id in (select value from json_each(?)) and r.drying_check_count > 0
    and w.stage = 'drying-check' and w.superseded_by is null and w.deleted_at is null
  order by w.measured_at, w.id`;

/** A coupon's row of COUPONS_OF_RUNS. */
type CouponOfRunRow = Omit<RunCouponInfo, 'stagesWeighed' | 'dryingChecks'> & {
  dry: number | null;
  soaked: number | null;
  cured: number | null;
  wetTest: number | null;
  dryingCheckCount: number;
};

/**
 * What the run checks and the run page need about each coupon of these runs, from the results table
 * (one row per coupon) plus the current drying checks of the coupons that have any. Grouped with Maps.
 */
export function couponsOfRuns(db: Db, runIds: number[]): RunCouponInfo[] {
  if (runIds.length === 0) return [];
  const ids = JSON.stringify(runIds);
  const rows = prepared(db, COUPONS_OF_RUNS).all(ids) as CouponOfRunRow[];
  if (rows.length === 0) return [];
  const checksByCoupon = new Map<number, { at: string; massG: number }[]>();
  if (rows.some((r) => r.dryingCheckCount > 0)) {
    const ws = prepared(db, DRYING_CHECKS_OF_RUNS).all(ids) as { couponId: number; at: string; massG: number }[];
    for (const w of ws) {
      const list = checksByCoupon.get(w.couponId);
      if (list) list.push({ at: w.at, massG: w.massG });
      else checksByCoupon.set(w.couponId, [{ at: w.at, massG: w.massG }]);
    }
  }
  return rows.map((r) => {
    const dryingChecks = checksByCoupon.get(r.id) ?? [];
    const has: Record<WeighingStage, boolean> = {
      dry: r.dry !== null,
      soaked: r.soaked !== null,
      cured: r.cured !== null,
      'wet-test': r.wetTest !== null,
      'drying-check': dryingChecks.length > 0,
    };
    return {
      id: r.id,
      tag: r.tag,
      role: r.role,
      runId: r.runId as number,
      speciesId: r.speciesId,
      speciesName: r.speciesName,
      stagesWeighed: WEIGHING_STAGES.filter((st) => has[st]),
      dryingChecks,
      thicknessMm: r.thicknessMm,
    };
  });
}

/** Coupons per run, from the results table: one grouped query. */
export function couponCountsOfRuns(db: Db, runIds: number[]): Map<number, number> {
  if (runIds.length === 0) return new Map();
  const rows = db
    .select({ runId: couponResults.runId, n: count() })
    .from(couponResults)
    .where(inIds(couponResults.runId, runIds))
    .groupBy(couponResults.runId)
    .all();
  return new Map(rows.map((r) => [r.runId as number, r.n]));
}

/**
 * Per run, the coupons still waiting for a weighing of `stage` (soaked and cured: treated coupons only),
 * counted, and the first `shown` of them by tag. Two grouped queries over the results table.
 */
export function couponsWaitingOfRuns(
  db: Db,
  wanted: { runId: number; stage: 'dry' | 'soaked' | 'cured' }[],
  shown: number,
): Map<number, { count: number; first: { id: number; tag: string }[] }> {
  const out = new Map<number, { count: number; first: { id: number; tag: string }[] }>();
  for (const stage of ['dry', 'soaked', 'cured'] as const) {
    const ids = wanted.filter((w) => w.stage === stage).map((w) => w.runId);
    if (ids.length === 0) continue;
    const mass = stage === 'dry' ? couponResults.dryMassG : stage === 'soaked' ? couponResults.soakedMassG : couponResults.curedMassG;
    const waiting = and(inIds(couponResults.runId, ids), isNull(mass), stage === 'dry' ? undefined : eq(couponResults.role, 'treated'));
    const counts = db.select({ runId: couponResults.runId, n: count() }).from(couponResults).where(waiting).groupBy(couponResults.runId).all();
    for (const c of counts) out.set(c.runId as number, { count: c.n, first: [] });
    // The first few of each run by tag: a window over the (run, tag) order, so no run's list is loaded whole.
    const first = db.all<{ runId: number; id: number; tag: string }>(
      sql`select run_id as runId, coupon_id as id, tag from (
            select run_id, coupon_id, tag, row_number() over (partition by run_id order by tag) as n
            from coupon_results where ${waiting}
          ) where n <= ${shown} order by run_id, tag`,
    );
    for (const f of first) out.get(f.runId)?.first.push({ id: f.id, tag: f.tag });
  }
  return out;
}

export function findCouponsByIds(db: Db, ids: number[]) {
  if (ids.length === 0) return [];
  return db.select({ id: coupons.id, tag: coupons.tag, role: coupons.role, runId: coupons.runId }).from(coupons).where(inArray(coupons.id, ids)).all();
}

/** Current soaked or cured weighings of these coupons: they tie a coupon to the run it went through. */
export function couponsWithTreatmentWeighings(db: Db, ids: number[]): Set<number> {
  if (ids.length === 0) return new Set();
  const rows = db
    .select({ couponId: weighings.couponId })
    .from(weighings)
    .where(and(inArray(weighings.couponId, ids), inArray(weighings.stage, ['soaked', 'cured']), isNull(weighings.supersededBy), isNull(weighings.deletedAt)))
    .all();
  return new Set(rows.map((r) => r.couponId));
}

export function photosOfRun(db: Db, runId: number): PhotoOut[] {
  return db.select().from(photos).where(eq(photos.runId, runId)).orderBy(asc(photos.id)).all().map(toPhotoOut);
}

/** The picker's light list: id, code and a label, newest first. */
export function runOptions(db: Db, q: OptionsQuery): Option[] {
  const rows = db
    .select({ id: runs.id, code: runs.code, chamber: runs.chamber })
    .from(runs)
    .where(q.q ? or(containsText(runs.code, q.q), containsText(runs.chamber, q.q)) : undefined)
    .orderBy(desc(runs.id))
    .limit(q.limit)
    .all();
  return rows.map((r) => ({ id: r.id, code: r.code, label: `${r.code} · ${r.chamber}` }));
}

const containsText = (col: SQLiteColumn, q: string) => sql`${col} like ${`%${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`} escape '\\'`;

// ───────── writes of the runs service (its list and reads query through the functions above) ─────────

export type RunInsert = typeof runs.$inferInsert;

export function insertRun(db: Db, values: RunInsert): RunRow {
  return db.insert(runs).values(values).returning().get();
}

export function updateRunRow(db: Db, id: number, values: Partial<RunInsert>): RunRow {
  return db.update(runs).set(values).where(eq(runs.id, id)).returning().get();
}

/** How many runs have a code starting with `prefix` (the year's prefix of generated codes). */
export function countRunCodesStartingWith(db: Db, prefix: string): number {
  return (
    db
      .select({ n: count() })
      .from(runs)
      .where(like(runs.code, `${prefix}%`))
      .get()?.n ?? 0
  );
}

/** Puts a coupon in a run, or (null) takes it out. */
export function setCouponRun(db: Db, couponId: number, runId: number | null): void {
  db.update(coupons).set({ runId }).where(eq(coupons.id, couponId)).run();
}

export function insertStageRow(db: Db, values: typeof runStages.$inferInsert): StageRow {
  return db.insert(runStages).values(values).returning().get();
}

const RUN_SORTS = { id: runs.id, code: runs.code, chamber: runs.chamber, createdAt: runs.createdAt } as const;
const likeEscaped = (col: SQLiteColumn, q: string) => sql`${col} like ${`%${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`} escape '\\'`;

/** The run list's WHERE: status, latest stage, lot and search (shared by the page, its count and the CSV export). */
function runListWhere(db: Db, q: RunExportQuery) {
  const stageExists = (stages: readonly RunStage[], ended?: boolean) =>
    exists(
      db
        .select({ one: runStages.id })
        .from(runStages)
        .where(and(eq(runStages.runId, runs.id), inArray(runStages.stage, [...stages]), ended ? isNotNull(runStages.endedAt) : undefined)),
    );
  const cureEnded = stageExists(['cure'], true);
  const later = q.stage ? RUN_STAGES.slice(RUN_STAGES.indexOf(q.stage) + 1) : [];
  const filters = [
    q.resinLotId === undefined ? undefined : eq(runs.resinLotId, q.resinLotId),
    q.status === 'planned' ? not(stageExists(RUN_STAGES)) : undefined,
    q.status === 'in-progress' ? and(stageExists(RUN_STAGES), not(cureEnded)) : undefined,
    q.status === 'finished' ? cureEnded : undefined,
    q.status === 'open' ? not(cureEnded) : undefined,
    q.stage ? and(stageExists([q.stage]), later.length ? not(stageExists(later)) : undefined) : undefined,
    q.q ? or(likeEscaped(runs.code, q.q), likeEscaped(runs.chamber, q.q)) : undefined,
  ].filter((f) => f !== undefined);
  return filters.length ? and(...filters) : undefined;
}

/** A page of the run list (newest first unless sorted otherwise; ties by id). */
export function listRunRows(db: Db, q: RunExportQuery, limit: number, offset: number): RunRow[] {
  const key = (q.sort ?? '-id').replace(/^-/, '') as keyof typeof RUN_SORTS;
  const direction = q.sort === undefined || q.sort.startsWith('-') ? desc : asc;
  return db
    .select()
    .from(runs)
    .where(runListWhere(db, q))
    .orderBy(direction(RUN_SORTS[key] ?? runs.id), desc(runs.id))
    .limit(limit)
    .offset(offset)
    .all();
}

/** How many runs the list's filters match. */
export function countRuns(db: Db, q: RunExportQuery): number {
  return db.select({ n: count() }).from(runs).where(runListWhere(db, q)).get()?.n ?? 0;
}

/** Runs whose cure has not ended, or ended after `cutoff` (a cured weighing may still be owed): Bench's candidates. */
export function benchCandidateRuns(db: Db, cutoff: string): { id: number; code: string; cureEnd: string | null }[] {
  return db
    .select({ id: runs.id, code: runs.code, cureEnd: runStages.endedAt })
    .from(runs)
    .leftJoin(runStages, and(eq(runStages.runId, runs.id), eq(runStages.stage, 'cure')))
    .where(or(isNull(runStages.endedAt), gte(runStages.endedAt, cutoff)))
    .all();
}

/** More audit entries than this since the last look: every run is taken as changed. */
const TOUCHED_SCAN_LIMIT = 500;
// What a run's remembered check data depends on: its coupons (their run, tag, readings) and the run itself.
const TOUCHED_BY_ENTRY = `select a.entity, a.entity_id as entityId,
    json_extract(a.before, '$.runId') as beforeRun, json_extract(a.after, '$.runId') as afterRun,
    case a.entity
      when 'coupon' then (select run_id from coupons where id = a.entity_id)
      when 'weighing' then (select c.run_id from weighings w join coupons c on c.id = w.coupon_id where w.id = a.entity_id)
      when 'check' then (select c.run_id from checks k join coupons c on c.id = k.coupon_id where k.id = a.entity_id)
      when 'run' then a.entity_id
      when 'run_stage' then (select run_id from run_stages where id = a.entity_id)
    end as runId
  from audit_log a where a.id > ? order by a.id limit ${TOUCHED_SCAN_LIMIT + 1}`;
/** Entries the query above places on a run. */
const PLACED = new Set(['coupon', 'weighing', 'check', 'run', 'run_stage']);
/** Entries that change nothing a run's checks read. */
const UNRELATED = new Set(['photo', 'finding', 'user', 'database']);

/**
 * The runs whose coupons or stages may have changed since audit entry `sinceId`, read from the audit log
 * (every write of the records writes an entry, decision 0018): a coupon, weighing or check names its
 * coupon's run (and a coupon moved between runs both runs), a run itself. Anything else (an import, a
 * lot, a species, the settings) or too many entries: 'all'.
 */
export function runsTouchedSince(db: Db, sinceId: number): Set<number> | 'all' {
  const rows = prepared(db, TOUCHED_BY_ENTRY).all(sinceId) as {
    entity: string;
    entityId: string | null;
    beforeRun: number | null;
    afterRun: number | null;
    runId: number | string | null;
  }[];
  if (rows.length > TOUCHED_SCAN_LIMIT) return 'all';
  const out = new Set<number>();
  for (const r of rows) {
    if (UNRELATED.has(r.entity)) continue;
    if (!PLACED.has(r.entity)) return 'all';
    for (const id of [r.runId, r.beforeRun, r.afterRun]) if (id !== null && id !== undefined) out.add(Number(id));
  }
  return out;
}
