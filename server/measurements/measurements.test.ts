import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { asc, count, eq } from 'drizzle-orm';
import { startHarness, type Harness } from '../testing/harness';
import { auditLog } from '../db/schema/admin';
import { users } from '../db/schema/auth';
import { checks, coupons, weighings } from '../db/schema/coupons';
import { species } from '../db/schema/reference';
import { couponResults } from '../db/schema/results';
import { AppError } from '../http/errors';
import { createMeasurements } from './measurements';
import { rebuildResults, refreshResults } from './results';

let h: Harness;
let actor: { id: number };
const m = createMeasurements({ now: () => new Date() });
const at = (hours: number) => new Date(Date.UTC(2026, 4, 1) + hours * 3_600_000).toISOString();

beforeAll(async () => {
  h = await startHarness();
  actor = { id: h.database.db.select({ id: users.id }).from(users).where(eq(users.email, 'tech@demo.test')).get()!.id };
});
afterAll(async () => {
  await h.close();
});

/** Fresh coupons with no readings, so each test starts from a known state. */
function newCoupons(n: number, role: 'treated' | 'control' = 'treated'): number[] {
  const db = h.database.db;
  const sp = db.select({ id: species.id }).from(species).limit(1).get()!.id;
  return db.transaction((tx) => {
    const ids = Array.from(
      { length: n },
      (_, i) =>
        tx
          .insert(coupons)
          .values({ tag: `BULK-${role}-${Date.now()}-${i}-${Math.random()}`, speciesId: sp, role })
          .returning()
          .get().id,
    );
    refreshResults(tx, ids);
    return ids;
  });
}

describe('measurements module: bulk path', () => {
  it('writes every reading with its source, one audit entry per coupon, and the results rows, in one transaction', () => {
    const db = h.database.db;
    const ids = newCoupons(3);
    const auditBefore = db.select({ n: count() }).from(auditLog).get()!.n;
    const out = db.transaction((tx) =>
      m.bulkAdd(
        tx,
        actor,
        'import:7',
        ids.map((couponId, i) => ({
          couponId,
          weighings: [
            { stage: 'dry' as const, massG: 10 + i, measuredAt: at(0) },
            { stage: 'cured' as const, massG: 15 + i, measuredAt: at(30) },
          ],
          checks: [{ kind: 'dimension' as const, stage: 'dry' as const, measuredAt: at(0), lengthMm: 100, widthMm: 20, thicknessMm: 10 }],
        })),
      ),
    );
    expect(out.written).toEqual({ weighings: 6, checks: 3 });
    const ws = db.select().from(weighings).where(eq(weighings.couponId, ids[0]!)).orderBy(asc(weighings.id)).all();
    expect(ws.map((w) => [w.stage, w.source, w.importId, w.createdBy])).toEqual([
      ['dry', 'import:7', 7, actor.id],
      ['cured', 'import:7', 7, actor.id],
    ]);
    expect(db.select().from(checks).where(eq(checks.couponId, ids[0]!)).get()).toMatchObject({ source: 'import:7', importId: 7 });
    expect(db.select({ n: count() }).from(auditLog).get()!.n - auditBefore).toBe(3);
    // WPG = (15 − 10) / 10 × 100 = 50 % (definition); dry SG = 10 g / 20 cm³ = 0.5.
    const r = db.select().from(couponResults).where(eq(couponResults.couponId, ids[0]!)).get()!;
    expect(r).toMatchObject({ dryMassG: 10, curedMassG: 15, wpgPct: 50, drySg: 0.5, dryVolumeCm3: 20 });
    const incremental = db.select().from(couponResults).orderBy(asc(couponResults.couponId)).all();
    db.transaction((tx) => rebuildResults(tx));
    expect(db.select().from(couponResults).orderBy(asc(couponResults.couponId)).all()).toEqual(incremental);
  });

  it("writes one audit entry for an import's readings when asked, with counts and the ids it wrote", () => {
    const db = h.database.db;
    const ids = newCoupons(3);
    const auditBefore = db.select({ n: count() }).from(auditLog).get()!.n;
    const out = db.transaction((tx) =>
      m.bulkAdd(
        tx,
        actor,
        'import:11',
        ids.map((couponId, i) => ({ couponId, weighings: [{ stage: 'dry' as const, massG: 10 + i, measuredAt: at(0) }] })),
        { audit: 'per-source' },
      ),
    );
    expect(out.couponIds).toEqual(ids);
    expect(db.select({ n: count() }).from(auditLog).get()!.n - auditBefore).toBe(1);
    const entry = db.select().from(auditLog).orderBy(asc(auditLog.id)).all().at(-1)!;
    const written = db.select().from(weighings).where(eq(weighings.importId, 11)).orderBy(asc(weighings.id)).all();
    expect(entry).toMatchObject({ action: 'add-readings', entity: 'import', entityId: '11', actorId: actor.id });
    expect(entry.after).toEqual({
      source: 'import:11',
      coupons: 3,
      weighings: 3,
      checks: 0,
      stages: { dry: 3 },
      weighingIds: { first: written[0]!.id, last: written[2]!.id },
      checkIds: null,
    });
    expect(db.select().from(couponResults).where(eq(couponResults.couponId, ids[2]!)).get()).toMatchObject({ dryMassG: 12 });
  });

  it('applies the same rules as a single write, within the bulk too, and writes nothing when any reading is refused', () => {
    const db = h.database.db;
    const [a, b] = newCoupons(2);
    const [ctrl] = newCoupons(1, 'control');
    const entries = [
      { couponId: a!, weighings: [{ stage: 'dry' as const, massG: 10, measuredAt: at(0) }] },
      // Below the dry mass of the entry before it: refused although that dry mass is not stored yet.
      { couponId: a!, weighings: [{ stage: 'cured' as const, massG: 9, measuredAt: at(30) }] },
      // A second dry weighing in the same file.
      { couponId: a!, weighings: [{ stage: 'dry' as const, massG: 11, measuredAt: at(1) }] },
      { couponId: ctrl!, weighings: [{ stage: 'soaked' as const, massG: 12, measuredAt: at(20) }] },
      { couponId: b!, checks: [{ kind: 'moisture' as const, stage: 'dry' as const, measuredAt: at(0), moisturePct: 400 }] },
      { couponId: 99_999_999, weighings: [{ stage: 'dry' as const, massG: 5, measuredAt: at(0) }] },
      { couponId: b!, weighings: [{ stage: 'dry' as const, massG: 8, measuredAt: at(0) }] },
    ];
    const problems = db.transaction((tx) => m.checkBulk(tx, entries));
    expect(problems.map((p) => [p.entry, p.field, p.code])).toEqual([
      [1, 'massG', 'unprocessable'],
      [2, 'stage', 'conflict'],
      [3, 'stage', 'unprocessable'],
      [4, 'moisturePct', 'unprocessable'],
      [5, 'couponId', 'unprocessable'],
    ]);
    const before = db.select({ n: count() }).from(weighings).get()!.n;
    let error: unknown;
    try {
      db.transaction((tx) => m.bulkAdd(tx, actor, 'import:8', entries));
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(AppError);
    expect((error as AppError).message).toMatch(/^5 readings have problems, nothing was saved/);
    expect(Object.keys((error as AppError).fieldErrors ?? {})).toEqual([
      'entries.1.weighings.0.massG',
      'entries.2.weighings.0.stage',
      'entries.3.weighings.0.stage',
      'entries.4.checks.0.moisturePct',
      'entries.5.couponId',
    ]);
    expect(db.select({ n: count() }).from(weighings).get()!.n).toBe(before);
  });
  it('writes the others and answers the refused ones when asked to skip them', () => {
    const db = h.database.db;
    const [a, b] = newCoupons(2);
    const [ctrl] = newCoupons(1, 'control');
    const out = db.transaction((tx) =>
      m.bulkAdd(
        tx,
        actor,
        'import:9',
        [
          { couponId: a!, weighings: [{ stage: 'dry' as const, massG: 10, measuredAt: at(0) }] },
          { couponId: ctrl!, weighings: [{ stage: 'cured' as const, massG: 12, measuredAt: at(20) }] },
          { couponId: b!, weighings: [{ stage: 'dry' as const, massG: -1, measuredAt: at(0) }] },
        ],
        { skipRefused: true },
      ),
    );
    expect(out.written).toEqual({ weighings: 1, checks: 0 });
    expect(out.couponIds).toEqual([a]);
    expect(out.refused.map((p) => [p.entry, p.field])).toEqual([
      [1, 'stage'],
      [2, 'massG'],
    ]);
    expect(db.select().from(couponResults).where(eq(couponResults.couponId, a!)).get()).toMatchObject({ dryMassG: 10 });
  });

  it('writes without judging again when the change counter has not moved since the judgement, and judges again when it has', () => {
    const db = h.database.db;
    const [a, b] = newCoupons(2);
    const dry = (couponId: number, massG: number) => ({ couponId, weighings: [{ stage: 'dry' as const, massG, measuredAt: at(0) }] });
    const judgedAt = m.changeCounter(db);
    expect(db.transaction((tx) => m.checkBulk(tx, [dry(a!, 10)]))).toEqual([]);
    const first = db.transaction((tx) => m.bulkAdd(tx, actor, 'import:11', [dry(a!, 10)], { skipRefused: true, audit: 'per-source', judgedAt }));
    expect(first).toMatchObject({ judgedAgain: false, refused: [], written: { weighings: 1, checks: 0 } });
    // That write moved the counter: the same judgement no longer vouches for b, whose dry mass a write now gives.
    expect(db.transaction((tx) => m.checkBulk(tx, [dry(b!, 9)]))).toEqual([]);
    db.transaction((tx) => m.addWeighing(tx, actor, 'entry', b!, { stage: 'dry', massG: 9.5, measuredAt: at(1) }));
    const second = db.transaction((tx) => m.bulkAdd(tx, actor, 'import:11', [dry(b!, 9)], { skipRefused: true, audit: 'per-source', judgedAt }));
    expect(second.judgedAgain).toBe(true);
    expect(second.refused.map((p) => [p.entry, p.field, p.code])).toEqual([[0, 'stage', 'conflict']]);
    expect(
      db
        .select()
        .from(weighings)
        .where(eq(weighings.couponId, b!))
        .all()
        .map((w) => w.massG),
    ).toEqual([9.5]);
  });

  it('soft-deletes many readings at once: kept with deleted_at, one audit entry per coupon, results rewritten', () => {
    const db = h.database.db;
    const ids = newCoupons(2);
    db.transaction((tx) =>
      m.bulkAdd(
        tx,
        actor,
        'import:10',
        ids.map((couponId) => ({
          couponId,
          weighings: [
            { stage: 'dry' as const, massG: 10, measuredAt: at(0) },
            { stage: 'cured' as const, massG: 14, measuredAt: at(30) },
          ],
        })),
      ),
    );
    const written = db.select().from(weighings).where(eq(weighings.importId, 10)).all();
    const auditBefore = db.select({ n: count() }).from(auditLog).get()!.n;
    const out = db.transaction((tx) => m.bulkDelete(tx, actor, { weighings: written.map((w) => w.id) }, 'wrong file'));
    expect(out.deleted).toEqual({ weighings: 4, checks: 0 });
    const after = db.select().from(weighings).where(eq(weighings.importId, 10)).all();
    expect(after).toHaveLength(4);
    expect(after.every((w) => w.deletedAt === out.deletedAt)).toBe(true);
    const entries = db.select().from(auditLog).where(eq(auditLog.action, 'delete-readings')).orderBy(asc(auditLog.id)).all().slice(-2);
    expect(db.select({ n: count() }).from(auditLog).get()!.n - auditBefore).toBe(2);
    expect(entries.map((e) => [e.entity, e.entityId, e.reason])).toEqual(ids.map((id) => ['coupon', String(id), 'wrong file']));
    expect((entries[0]!.before as { weighings: { massG: number }[] }).weighings.map((w) => w.massG)).toEqual([10, 14]);
    expect(db.select().from(couponResults).where(eq(couponResults.couponId, ids[0]!)).get()).toMatchObject({ dryMassG: null, curedMassG: null });
    // Deleting again is refused, as for a single reading, and changes nothing.
    expect(() => db.transaction((tx) => m.bulkDelete(tx, actor, { weighings: [written[0]!.id] }, 'twice'))).toThrow(/was deleted/);
    const incremental = db.select().from(couponResults).orderBy(asc(couponResults.couponId)).all();
    db.transaction((tx) => rebuildResults(tx));
    expect(db.select().from(couponResults).orderBy(asc(couponResults.couponId)).all()).toEqual(incremental);
  });
});
