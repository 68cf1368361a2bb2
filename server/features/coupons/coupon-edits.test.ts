import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startHarness, type Harness } from '../../testing/harness';
import { and, eq } from 'drizzle-orm';
import { species } from '../../db/schema/reference';
import { couponResults } from '../../db/schema/results';
import { auditLog } from '../../db/schema/admin';
import { runReadings } from '../../db/schema/runs';

type Agent = Awaited<ReturnType<Harness['signIn']>>;
const HOUR = 3_600_000;
const t = (hours: number) => new Date(Date.UTC(2026, 2, 1) + hours * HOUR).toISOString();

let h: Harness;
let tech: Agent;
let admin: Agent;
let mapleId: number;
let seq = 0;

beforeAll(async () => {
  h = await startHarness();
  tech = await h.signIn('tech@demo.test');
  admin = await h.signIn('admin@demo.test');
  mapleId = h.database.db
    .select()
    .from(species)
    .all()
    .find((s) => s.commonName === 'Maple, red')!.id;
});
afterAll(async () => {
  await h.close();
});

async function treatedCoupon(): Promise<{ id: number; version: number }> {
  seq++;
  const res = await tech.post('/api/coupons').send({ tag: `EDIT-${seq}`, speciesId: mapleId, role: 'treated' });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return { id: res.body.coupon.id, version: res.body.coupon.version };
}

describe('turning a coupon into a control', () => {
  it('is refused while it has resin weighings, naming them', async () => {
    const c = await treatedCoupon();
    expect((await tech.post(`/api/coupons/${c.id}/weighings`).send({ stage: 'dry', massG: 20, measuredAt: t(0) })).status).toBe(201);
    expect((await tech.post(`/api/coupons/${c.id}/weighings`).send({ stage: 'soaked', massG: 30, measuredAt: t(2) })).status).toBe(201);
    const res = await tech.patch(`/api/coupons/${c.id}`).send({ role: 'control', version: c.version, reason: 'labelled wrong' });
    expect(res.status).toBe(409);
    expect(res.body.error.fieldErrors.role[0]).toMatch(/soaked weighings/);
    const after = await tech.get(`/api/coupons/${c.id}`);
    expect(after.body.coupon.role).toBe('treated');
  });

  it('is allowed for a coupon with only dry readings', async () => {
    const c = await treatedCoupon();
    await tech.post(`/api/coupons/${c.id}/weighings`).send({ stage: 'dry', massG: 20, measuredAt: t(0) });
    const res = await tech.patch(`/api/coupons/${c.id}`).send({ role: 'control', version: c.version });
    expect(res.status).toBe(200);
    expect(res.body.coupon.role).toBe('control');
  });
});

describe('coupon edits carry the version they were made on', () => {
  it('a stale version is refused with 409 and changes nothing; the current one goes through and bumps it', async () => {
    const c = await treatedCoupon();
    expect(c.version).toBe(1);
    const first = await tech.patch(`/api/coupons/${c.id}`).send({ notes: 'first editor', version: 1 });
    expect(first.status).toBe(200);
    expect(first.body.coupon.version).toBe(2);
    const second = await admin.patch(`/api/coupons/${c.id}`).send({ notes: 'second editor, on a stale view', version: 1 });
    expect(second.status).toBe(409);
    expect(second.body.error.fieldErrors.version[0]).toMatch(/changed this coupon since you opened it/);
    expect((await tech.get(`/api/coupons/${c.id}`)).body.coupon.notes).toBe('first editor');
    const missing = await tech.patch(`/api/coupons/${c.id}`).send({ notes: 'no version' });
    expect(missing.status).toBe(400);
    expect(missing.body.error.fieldErrors.version).toBeTruthy();
  });
});

describe('history keeps who did it, as they were named then', () => {
  it('a later rename does not rewrite past entries, and the e-mail names the account', async () => {
    const c = await treatedCoupon();
    const me = (await tech.get('/api/auth/me')).body.user;
    expect((await tech.post(`/api/coupons/${c.id}/weighings`).send({ stage: 'dry', massG: 20, measuredAt: t(0) })).status).toBe(201);
    // The technician takes the owner's name.
    const owner = (await admin.get('/api/auth/me')).body.user;
    expect((await tech.patch('/api/auth/me').send({ name: owner.name })).status).toBe(200);
    const history = (await tech.get(`/api/coupons/${c.id}/history`)).body;
    const entries = history.audit.filter((e: { actorId: number }) => e.actorId === me.id);
    expect(entries.length).toBeGreaterThanOrEqual(2);
    for (const e of entries) expect(e).toMatchObject({ actorName: me.name, actorEmail: 'tech@demo.test' });
    await tech.patch('/api/auth/me').send({ name: me.name });
  });
});

describe('changes to a resin or a run that move recorded results', () => {
  it('a new cured density asks for a reason, recomputes the results and writes it on every affected coupon', async () => {
    // A demo resin whose coupons have a void fill (cured and measured).
    const measured = h.database.db
      .select()
      .from(couponResults)
      .all()
      .filter((r) => r.voidFillPct !== null && r.resinId !== null);
    expect(measured.length).toBeGreaterThan(0);
    const resinId = measured[0]!.resinId!;
    const affected = measured.filter((r) => r.resinId === resinId);
    const resin = (await admin.get(`/api/resins/${resinId}`)).body.resin;
    const density = Math.round((resin.curedDensityGcm3 + 0.05) * 1000) / 1000;

    const silent = await admin.patch(`/api/resins/${resinId}`).send({ curedDensityGcm3: density });
    expect(silent.status).toBe(400);
    expect(silent.body.error.fieldErrors.reason[0]).toMatch(new RegExp(`moves the results of ${affected.length} measured coupon`));
    expect((await admin.get(`/api/resins/${resinId}`)).body.resin.curedDensityGcm3).toBe(resin.curedDensityGcm3);

    const ok = await admin.patch(`/api/resins/${resinId}`).send({ curedDensityGcm3: density, reason: 'density measured again on a cured puck' });
    expect(ok.status, JSON.stringify(ok.body)).toBe(200);
    const one = affected[0]!;
    const now = h.database.db.select().from(couponResults).where(eq(couponResults.couponId, one.couponId)).get()!;
    expect(now.voidFillPct).not.toBe(one.voidFillPct);
    const history = (await tech.get(`/api/coupons/${one.couponId}/history`)).body.audit;
    const entry = history.find((e: { action: string }) => e.action === 'results-recomputed');
    expect(entry).toMatchObject({ reason: 'density measured again on a cured puck', actorEmail: 'admin@demo.test' });
    expect(entry.before).toMatchObject({ voidFillPct: one.voidFillPct, resin: { id: resinId, curedDensityGcm3: resin.curedDensityGcm3 } });
    expect(entry.after).toMatchObject({ voidFillPct: now.voidFillPct, resin: { id: resinId, curedDensityGcm3: density } });
    const recorded = h.database.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.action, 'results-recomputed'), eq(auditLog.entity, 'coupon')))
      .all();
    expect(new Set(recorded.map((r) => r.entityId))).toEqual(new Set(affected.map((r) => String(r.couponId))));
  });

  it("a new altitude asks for a reason when it moves recorded gauge readings, and the run's history says what moved", async () => {
    const withReadings = h.database.db.select().from(runReadings).all();
    const runId = withReadings[0]!.runId;
    const run = (await tech.get(`/api/runs/${runId}`)).body.run;
    const silent = await tech.patch(`/api/runs/${runId}`).send({ altitudeM: run.altitudeM - 300 });
    expect(silent.status).toBe(400);
    expect(silent.body.error.fieldErrors.reason[0]).toMatch(/moves the absolute pressure/);
    const ok = await tech.patch(`/api/runs/${runId}`).send({ altitudeM: run.altitudeM - 300, reason: 'the chamber moved to the upstairs shop' });
    expect(ok.status, JSON.stringify(ok.body)).toBe(200);
    const entry = h.database.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'run'), eq(auditLog.entityId, String(runId)), eq(auditLog.action, 'readings-recomputed')))
      .get();
    expect(entry).toMatchObject({ reason: 'the chamber moved to the upstairs shop', actorName: expect.any(String), actorEmail: 'tech@demo.test' });
    expect((entry?.before as { altitudeM: number }).altitudeM).toBe(run.altitudeM);
    expect((entry?.after as { readings: unknown[] }).readings.length).toBe(withReadings.filter((r) => r.runId === runId).length);
  });
});

describe('impossible and questionable dates', () => {
  it('an impossible date is refused naming the field; a future one is kept and questioned', async () => {
    const c = await treatedCoupon();
    for (const when of ['2026-02-30T12:00:00Z', '2026-03-01T24:00:00Z', '0001-03-01T12:00:00Z', '9999-03-01T12:00:00Z']) {
      const res = await tech.post(`/api/coupons/${c.id}/weighings`).send({ stage: 'dry', massG: 20, measuredAt: when });
      expect(res.status, when).toBe(400);
      expect(res.body.error.fieldErrors.measuredAt, when).toBeTruthy();
    }
    const future = new Date(Date.now() + 3 * 24 * HOUR).toISOString();
    const res = await tech.post(`/api/coupons/${c.id}/weighings`).send({ stage: 'dry', massG: 20, measuredAt: future });
    expect(res.status).toBe(201);
    expect(res.body.warnings).toEqual(
      expect.arrayContaining([expect.objectContaining({ field: 'measuredAt', message: expect.stringMatching(/in the future/) })]),
    );
  });
});
