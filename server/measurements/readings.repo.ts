import { and, asc, eq, isNull } from 'drizzle-orm';
import type { Db } from '../db/client';
import { checks, coupons, weighings } from '../db/schema/coupons';

export type CouponRow = typeof coupons.$inferSelect;
export type WeighingRow = typeof weighings.$inferSelect;
export type CheckRow = typeof checks.$inferSelect;

export function couponById(db: Db, id: number): CouponRow | undefined {
  return db.select().from(coupons).where(eq(coupons.id, id)).get();
}

export function currentWeighingsOf(db: Db, couponId: number): WeighingRow[] {
  return db
    .select()
    .from(weighings)
    .where(and(eq(weighings.couponId, couponId), isNull(weighings.supersededBy), isNull(weighings.deletedAt)))
    .orderBy(asc(weighings.measuredAt), asc(weighings.id))
    .all();
}

export function currentChecksOf(db: Db, couponId: number): CheckRow[] {
  return db
    .select()
    .from(checks)
    .where(and(eq(checks.couponId, couponId), isNull(checks.supersededBy), isNull(checks.deletedAt)))
    .orderBy(asc(checks.measuredAt), asc(checks.id))
    .all();
}

export function weighingById(db: Db, id: number): WeighingRow | undefined {
  return db.select().from(weighings).where(eq(weighings.id, id)).get();
}

export function checkById(db: Db, id: number): CheckRow | undefined {
  return db.select().from(checks).where(eq(checks.id, id)).get();
}

export function insertWeighing(db: Db, values: typeof weighings.$inferInsert): WeighingRow {
  return db.insert(weighings).values(values).returning().get();
}

export function insertCheck(db: Db, values: typeof checks.$inferInsert): CheckRow {
  return db.insert(checks).values(values).returning().get();
}

export function markWeighing(db: Db, id: number, set: { supersededBy?: number; deletedAt?: string }): void {
  db.update(weighings).set(set).where(eq(weighings.id, id)).run();
}

export function markCheck(db: Db, id: number, set: { supersededBy?: number; deletedAt?: string }): void {
  db.update(checks).set(set).where(eq(checks.id, id)).run();
}
