import { and, asc, count, eq, inArray, isNull, like } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { checks, coupons, photos, weighings } from '../../db/schema/coupons';
import { resinLots, resins, species } from '../../db/schema/reference';
import { runReadings, runStages, runs } from '../../db/schema/runs';
import type { ShopSettings } from '../../../shared/schemas/admin';
import { readShopSettings } from '../../db/shop-settings';
import { toPhotoOut } from '../../db/photo-out';
import type { WeighingStage } from '../../../shared/constants/records';
import type { PhotoOut } from '../../../shared/schemas/runs';

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

export function stagesOf(db: Db, runIds: number[]): StageRow[] {
  if (runIds.length === 0) return [];
  return db.select().from(runStages).where(inArray(runStages.runId, runIds)).all();
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
  const rows = db
    .select({ lot: resinLots, resin: resins })
    .from(resinLots)
    .innerJoin(resins, eq(resinLots.resinId, resins.id))
    .where(inArray(resinLots.id, ids))
    .all();
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

export function couponsOfRuns(db: Db, runIds: number[]): RunCouponInfo[] {
  if (runIds.length === 0) return [];
  const rows = db
    .select({ id: coupons.id, tag: coupons.tag, role: coupons.role, runId: coupons.runId, speciesId: coupons.speciesId, speciesName: species.commonName })
    .from(coupons)
    .innerJoin(species, eq(coupons.speciesId, species.id))
    .where(inArray(coupons.runId, runIds))
    .orderBy(asc(coupons.tag))
    .all();
  if (rows.length === 0) return [];
  const ids = rows.map((r) => r.id);
  const current = (t: typeof weighings | typeof checks) => and(isNull(t.supersededBy), isNull(t.deletedAt));
  const ws = db
    .select({ couponId: weighings.couponId, stage: weighings.stage, massG: weighings.massG, measuredAt: weighings.measuredAt })
    .from(weighings)
    .where(and(inArray(weighings.couponId, ids), current(weighings)))
    .all();
  const dims = db
    .select({ couponId: checks.couponId, thicknessMm: checks.thicknessMm, measuredAt: checks.measuredAt })
    .from(checks)
    .where(and(inArray(checks.couponId, ids), eq(checks.kind, 'dimension'), eq(checks.stage, 'dry'), current(checks)))
    .all();
  return rows.map((r) => {
    const mine = ws.filter((w) => w.couponId === r.id);
    const dim = dims.filter((d) => d.couponId === r.id && d.thicknessMm !== null).sort((a, b) => b.measuredAt.localeCompare(a.measuredAt))[0];
    return {
      ...r,
      runId: r.runId as number,
      stagesWeighed: [...new Set(mine.map((w) => w.stage))],
      dryingChecks: mine.filter((w) => w.stage === 'drying-check').map((w) => ({ at: w.measuredAt, massG: w.massG })),
      thicknessMm: dim?.thicknessMm ?? null,
    };
  });
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
