import zlib from 'node:zlib';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, count, eq } from 'drizzle-orm';
import { startHarness, type Harness } from '../../testing/harness';
import { auditLog } from '../../db/schema/admin';
import { checks, photos, weighings } from '../../db/schema/coupons';
import { resinLots, resins, species } from '../../db/schema/reference';
import { trials } from '../../db/schema/trials';

type Agent = Awaited<ReturnType<Harness['signIn']>>;
type RoleName = 'admin' | 'reviewer' | 'technician' | 'viewer';
const ROLE_ORDER: RoleName[] = ['viewer', 'technician', 'reviewer', 'admin'];
const where = (res: { status: number }) => {
  const r = (res as unknown as { req: { method: string; path: string } }).req;
  return `${r.method} ${r.path}`;
};
const HOUR = 3_600_000;
const t = (h: number) => new Date(Date.UTC(2026, 2, 1) + h * HOUR).toISOString();

let h: Harness;
let as: Record<RoleName, Agent>;
let seq = 0;
/** Red maple, a handbook reference row: basic SG 0.49 as seeded from Wood Handbook FPL-GTR-190 table 5-3a. */
let mapleId: number;
let otherSpeciesId: number;

beforeAll(async () => {
  h = await startHarness();
  as = {
    admin: await h.signIn('admin@demo.test'),
    reviewer: await h.signIn('reviewer@demo.test'),
    technician: await h.signIn('tech@demo.test'),
    viewer: await h.signIn('viewer@demo.test'),
  };
  const sp = h.database.db.select().from(species).all();
  mapleId = sp.find((s) => s.commonName === 'Maple, red')!.id;
  otherSpeciesId = sp.find((s) => s.commonName !== 'Maple, red' && s.basicSg !== null)!.id;
});
afterAll(async () => {
  await h.close();
});

async function makeCoupon(body: Record<string, unknown> = {}): Promise<number> {
  seq++;
  const res = await as.technician.post('/api/coupons').send({ tag: `CT-${seq}`, speciesId: mapleId, role: 'treated', ...body });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.coupon.id;
}
const weigh = (id: number, stage: string, massG: number, at = t(0), agent: Agent = as.technician) =>
  agent.post(`/api/coupons/${id}/weighings`).send({ stage, massG, measuredAt: at });
const dims = (id: number, stage: string, l: number, w: number, th: number, at = t(0)) =>
  as.technician.post(`/api/coupons/${id}/checks`).send({ kind: 'dimension', stage, measuredAt: at, lengthMm: l, widthMm: w, thicknessMm: th });

/** A real PNG: signature, IHDR, one IDAT, IEND, each chunk with its CRC-32 (PNG spec §5). */
function tinyPng(): Buffer {
  const chunk = (type: string, data: Buffer) => {
    const len = Buffer.alloc(4);
    len.writeUInt32BE(data.length);
    const body = Buffer.concat([Buffer.from(type, 'latin1'), data]);
    const crc = Buffer.alloc(4);
    crc.writeUInt32BE(zlib.crc32(body));
    return Buffer.concat([len, body, crc]);
  };
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(1, 0); // width
  ihdr.writeUInt32BE(1, 4); // height
  ihdr[8] = 8; // bit depth
  ihdr[9] = 2; // truecolour
  const pixels = zlib.deflateSync(Buffer.from([0, 200, 150, 90])); // filter byte + one RGB pixel
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', ihdr),
    chunk('IDAT', pixels),
    chunk('IEND', Buffer.alloc(0)),
  ]);
}

describe('coupon routes: who may do what', () => {
  it('answers 401 on every coupon, measurement and photo route without a session', async () => {
    const anon = h.agent();
    const calls = [
      anon.get('/api/coupons'),
      anon.post('/api/coupons').send({}),
      anon.get('/api/coupons/1'),
      anon.patch('/api/coupons/1').send({ notes: 'x' }),
      anon.post('/api/coupons/1/weighings').send({}),
      anon.post('/api/coupons/1/checks').send({}),
      anon.get('/api/coupons/1/history'),
      anon.post('/api/coupons/measurements').send({ entries: [] }),
      anon.patch('/api/weighings/1').send({ massG: 1, reason: 'typo fix' }),
      anon.delete('/api/weighings/1').send({ reason: 'typo fix' }),
      anon.patch('/api/checks/1').send({ lengthMm: 1, reason: 'typo fix' }),
      anon.delete('/api/checks/1').send({ reason: 'typo fix' }),
      anon.post('/api/coupons/1/photos'),
      anon.post('/api/runs/1/photos'),
      anon.get('/api/photos/1'),
    ];
    for (const res of await Promise.all(calls)) {
      expect(res.status, where(res)).toBe(401);
      expect(res.body.error.code).toBe('unauthenticated');
    }
  });

  it('lets every role read, and only technicians and above write, on every route', async () => {
    const id = await makeCoupon();
    for (const role of ROLE_ORDER) {
      const a = as[role];
      for (const res of await Promise.all([a.get('/api/coupons'), a.get(`/api/coupons/${id}`), a.get(`/api/coupons/${id}/history`)])) {
        expect(res.status, `${role} ${where(res)}`).toBe(200);
      }
    }
    for (const [i, role] of ROLE_ORDER.entries()) {
      const a = as[role];
      const own = await makeCoupon();
      const w = await weigh(own, 'dry', 20, t(i), a);
      const c = await a.post(`/api/coupons/${own}/checks`).send({ kind: 'moisture', stage: 'dry', measuredAt: t(i), moisturePct: 3 });
      const created = await a.post('/api/coupons').send({ tag: `ROLE-${role}`, speciesId: mapleId, role: 'control' });
      const patched = await a.patch(`/api/coupons/${own}`).send({ notes: `by ${role}`, version: 1 });
      const batch = await a
        .post('/api/coupons/measurements')
        .send({ entries: [{ couponId: own, weighings: [{ stage: 'drying-check', massG: 21, measuredAt: t(i) }] }] });
      const photo = await a.post(`/api/coupons/${own}/photos`).attach('file', tinyPng(), 'tiny.png');
      const answers = [w, c, created, patched, batch, photo];
      if (role === 'viewer') {
        for (const res of answers) expect(res.status, `${role} ${where(res)}`).toBe(403);
        // The viewer also cannot correct or delete what others entered.
        const tw = await weigh(own, 'dry', 20);
        const tc = await as.technician.post(`/api/coupons/${own}/checks`).send({ kind: 'moisture', stage: 'dry', measuredAt: t(0), moisturePct: 3 });
        const denied = [
          await a.patch(`/api/weighings/${tw.body.weighing.id}`).send({ massG: 21, reason: 'typo fix' }),
          await a.delete(`/api/weighings/${tw.body.weighing.id}`).send({ reason: 'typo fix' }),
          await a.patch(`/api/checks/${tc.body.check.id}`).send({ moisturePct: 4, reason: 'typo fix' }),
          await a.delete(`/api/checks/${tc.body.check.id}`).send({ reason: 'typo fix' }),
          await a.post('/api/runs/1/photos').attach('file', tinyPng(), 'tiny.png'),
        ];
        for (const res of denied) expect(res.status, `${role} ${where(res)}`).toBe(403);
      } else {
        for (const res of answers) expect(res.status, `${role} ${where(res)} ${JSON.stringify(res.body)}`).toBe(res === patched ? 200 : 201);
        const allowed = [
          await a.patch(`/api/weighings/${w.body.weighing.id}`).send({ massG: 20.5, reason: 'typo fix' }),
          await a.patch(`/api/checks/${c.body.check.id}`).send({ moisturePct: 4, reason: 'typo fix' }),
        ];
        for (const res of allowed) expect(res.status, `${role} ${where(res)}`).toBe(200);
        expect((await a.delete(`/api/weighings/${allowed[0]!.body.weighing.id}`).send({ reason: 'wrong coupon' })).status).toBe(200);
        expect((await a.delete(`/api/checks/${allowed[1]!.body.check.id}`).send({ reason: 'wrong coupon' })).status).toBe(200);
      }
    }
  });
});

describe('coupons', () => {
  it('creates a coupon, refuses a taken tag with 409 and names the bad field', async () => {
    const res = await as.technician.post('/api/coupons').send({ tag: 'CT-NEW-1', speciesId: mapleId, role: 'treated', sourceBoard: 'board 7' });
    expect(res.status).toBe(201);
    expect(res.body.coupon).toMatchObject({
      tag: 'CT-NEW-1',
      speciesName: 'Maple, red',
      role: 'treated',
      sourceBoard: 'board 7',
      runId: null,
      weighings: [],
      photos: [],
    });
    const dup = await as.technician.post('/api/coupons').send({ tag: 'CT-NEW-1', speciesId: mapleId, role: 'treated' });
    expect(dup.status).toBe(409);
    expect(dup.body.error.fieldErrors.tag).toBeTruthy();
    const bad = await as.technician.post('/api/coupons').send({ tag: '', speciesId: mapleId, role: 'sideways' });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fieldErrors).sort()).toEqual(['role', 'tag']);
    const noSpecies = await as.technician.post('/api/coupons').send({ tag: 'CT-NEW-2', speciesId: 999999, role: 'treated' });
    expect(noSpecies.status).toBe(422);
    expect(noSpecies.body.error.fieldErrors.speciesId).toBeTruthy();
    expect((await as.viewer.get('/api/coupons/999999')).status).toBe(404);
  });

  it('filters the list by run, trial, species and role', async () => {
    const trial = h.database.db.select().from(trials).where(eq(trials.code, 'T26-001')).get()!;
    const byTrial = await as.viewer.get(`/api/coupons?trialId=${trial.id}&role=control&pageSize=200`);
    expect(byTrial.status).toBe(200);
    expect(byTrial.body.items.length).toBeGreaterThan(0);
    expect(byTrial.body.items.every((c: { trialId: number; role: string }) => c.trialId === trial.id && c.role === 'control')).toBe(true);
    const other = await makeCoupon({ speciesId: otherSpeciesId });
    const bySpecies = await as.viewer.get(`/api/coupons?speciesId=${otherSpeciesId}&pageSize=200`);
    expect(bySpecies.body.items.map((c: { id: number }) => c.id)).toContain(other);
    expect(bySpecies.body.items.every((c: { speciesId: number }) => c.speciesId === otherSpeciesId)).toBe(true);
    const run = await as.technician.post('/api/runs').send({ chamber: 'List chamber', couponIds: [other] });
    const byRun = await as.viewer.get(`/api/coupons?runId=${run.body.run.id}`);
    expect(byRun.body).toMatchObject({ total: 1, page: 1 });
    expect(byRun.body.items[0].id).toBe(other);
    expect((await as.viewer.get('/api/coupons?role=wrong')).status).toBe(400);
  });

  it('names the trial condition a coupon was made for, with the resin the plan wants', async () => {
    const trial = h.database.db.select().from(trials).where(eq(trials.code, 'T26-001')).get()!;
    const detail = await as.viewer.get(`/api/trials/${trial.id}`);
    const conditions = detail.body.trial.conditions as { id: number; label: string; processLabel: string; resinId: number; resinName: string }[];
    const list = await as.viewer.get(`/api/coupons?trialId=${trial.id}&pageSize=200`);
    const treated = list.body.items.filter((c: { role: string }) => c.role === 'treated');
    expect(treated.length).toBeGreaterThan(0);
    for (const c of treated) {
      const planned = conditions.find((k) => k.id === c.conditionId)!;
      expect(c.condition).toEqual({
        id: planned.id,
        label: planned.label,
        processLabel: planned.processLabel,
        plannedResin: { id: planned.resinId, name: planned.resinName },
      });
    }
    const controls = list.body.items.filter((c: { role: string }) => c.role === 'control');
    expect(controls.every((c: { condition: unknown }) => c.condition === null)).toBe(true);
  });

  it('records a change to a coupon in the audit log', async () => {
    const id = await makeCoupon();
    const res = await as.technician.patch(`/api/coupons/${id}`).send({ sourceBoard: 'board 2', reason: 'label read wrong', version: 1 });
    expect(res.status).toBe(200);
    const entry = h.database.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'coupon'), eq(auditLog.entityId, String(id)), eq(auditLog.action, 'update')))
      .get();
    expect(entry).toMatchObject({ reason: 'label read wrong' });
    expect((entry?.after as { sourceBoard: string }).sourceBoard).toBe('board 2');
  });
});

describe('weighings and checks', () => {
  it('refuses impossible values with 422 and the reason', async () => {
    const id = await makeCoupon();
    expect((await weigh(id, 'dry', 40)).status).toBe(201);
    const below = await weigh(id, 'cured', 39.5);
    expect(below.status).toBe(422);
    expect(below.body.error.code).toBe('unprocessable');
    expect(below.body.error.fieldErrors.massG[0]).toMatch(/cured mass 39.5 g cannot be below the dry mass 40 g/);
    expect((await weigh(id, 'soaked', 38)).status).toBe(422);
    const zero = await weigh(id, 'drying-check', 0);
    expect(zero.status).toBe(422);
    expect(zero.body.error.fieldErrors.massG[0]).toMatch(/greater than 0/);
    expect((await weigh(id, 'drying-check', -3)).status).toBe(422);
    const moisture = await as.technician.post(`/api/coupons/${id}/checks`).send({ kind: 'moisture', stage: 'dry', measuredAt: t(0), moisturePct: 301 });
    expect(moisture.status).toBe(422);
    expect(moisture.body.error.fieldErrors.moisturePct[0]).toMatch(/0 and 300/);
    const shore = await as.technician
      .post(`/api/coupons/${id}/checks`)
      .send({ kind: 'hardness', stage: 'cured', measuredAt: t(0), hardnessValue: 104, hardnessScale: 'shore-d' });
    expect(shore.status).toBe(422);
    expect(shore.body.error.fieldErrors.hardnessValue[0]).toMatch(/Shore D/);
    const size = await dims(id, 'dry', 100, 0, 10);
    expect(size.status).toBe(422);
    expect(size.body.error.fieldErrors.widthMm).toBeTruthy();
    // None of the refused readings was written.
    expect(h.database.db.select({ n: count() }).from(weighings).where(eq(weighings.couponId, id)).get()!.n).toBe(1);
  });

  it('validates the shape of a reading and names the field', async () => {
    const id = await makeCoupon();
    const stage = await as.technician.post(`/api/coupons/${id}/weighings`).send({ stage: 'wet', massG: 3, measuredAt: t(0) });
    expect(stage.status).toBe(400);
    expect(stage.body.error.fieldErrors.stage).toBeTruthy();
    const when = await as.technician.post(`/api/coupons/${id}/weighings`).send({ stage: 'dry', massG: 3, measuredAt: 'yesterday' });
    expect(when.body.error.fieldErrors.measuredAt).toBeTruthy();
    const partial = await as.technician.post(`/api/coupons/${id}/checks`).send({ kind: 'dimension', stage: 'dry', measuredAt: t(0), lengthMm: 100 });
    expect(partial.status).toBe(400);
    expect(Object.keys(partial.body.error.fieldErrors).sort()).toEqual(['thicknessMm', 'widthMm']);
    const mixed = await as.technician
      .post(`/api/coupons/${id}/checks`)
      .send({ kind: 'moisture', stage: 'dry', measuredAt: t(0), moisturePct: 5, hardnessValue: 3 });
    expect(mixed.body.error.fieldErrors.hardnessValue).toEqual(['Unknown field']);
    const scale = await as.technician
      .post(`/api/coupons/${id}/checks`)
      .send({ kind: 'hardness', stage: 'dry', measuredAt: t(0), hardnessValue: 50, hardnessScale: 'rockwell' });
    expect(scale.body.error.fieldErrors.hardnessScale).toBeTruthy();
  });

  it('keeps hardness on the scale it was read in', async () => {
    const id = await makeCoupon();
    const res = await as.technician
      .post(`/api/coupons/${id}/checks`)
      .send({ kind: 'hardness', stage: 'cured', measuredAt: t(0), hardnessValue: 4800, hardnessScale: 'janka-n' });
    expect(res.status).toBe(201);
    expect(res.body.check).toMatchObject({ hardnessValue: 4800, hardnessScale: 'janka-n' });
    expect(res.body.coupon.metrics.hardness).toEqual([{ stage: 'cured', scale: 'janka-n', value: 4800 }]);
  });

  it('asks for a correction instead of a second dry weighing, and refuses resin weighings on a control', async () => {
    const id = await makeCoupon();
    await weigh(id, 'dry', 40);
    const again = await weigh(id, 'dry', 41);
    expect(again.status).toBe(409);
    expect(again.body.error.message).toMatch(/correct that one/);
    // Drying checks pile up by design.
    expect((await weigh(id, 'drying-check', 42, t(1))).status).toBe(201);
    expect((await weigh(id, 'drying-check', 41.5, t(3))).status).toBe(201);
    const control = await makeCoupon({ role: 'control' });
    const soaked = await weigh(control, 'soaked', 50);
    expect(soaked.status).toBe(422);
    expect(soaked.body.error.fieldErrors.stage[0]).toMatch(/control/);
  });

  it('warns, but keeps, a dry SG more than 3 SD from the species reference', async () => {
    // Red maple: oven-dry reference 0.49/(1 − 0.265·0.49) = 0.563; SD with the default 10 % CV = 0.0563.
    const ok = await makeCoupon();
    await dims(ok, 'dry', 100, 20, 10); // 20 cm³
    const plausible = await weigh(ok, 'dry', 12); // SG 0.60, 0.7 SD above
    expect(plausible.body.warnings).toEqual([]);
    const odd = await makeCoupon();
    await dims(odd, 'dry', 100, 20, 10);
    const heavy = await weigh(odd, 'dry', 16); // SG 0.80, 4.2 SD above
    expect(heavy.status).toBe(201);
    expect(heavy.body.warnings).toHaveLength(1);
    expect(heavy.body.warnings[0]).toMatchObject({ field: 'drySg' });
    expect(heavy.body.warnings[0].message).toMatch(/0\.800 is 4\.2 standard deviations above the species' oven-dry reference 0\.563/);
    expect(heavy.body.coupon.metrics.drySg).toBeCloseTo(0.8, 10);
  });

  it('answers computed metrics from the current readings, with void fill through run → lot → resin', async () => {
    const db = h.database.db;
    const resin = db.insert(resins).values({ name: 'Coupon test resin', kind: 'test', liquidDensityGcm3: 1.05, curedDensityGcm3: 1.2 }).returning().get();
    const lot = db.insert(resinLots).values({ resinId: resin.id, code: 'CT-LOT', activatedAt: '2026-02-01', volumeMl: 500 }).returning().get();
    const id = await makeCoupon();
    await as.technician.post('/api/runs').send({ chamber: 'Metrics chamber', resinLotId: lot.id, couponIds: [id] });
    await dims(id, 'dry', 100, 20, 10, t(0));
    await weigh(id, 'dry', 10, t(0));
    await weigh(id, 'soaked', 17, t(20));
    await weigh(id, 'cured', 16, t(26));
    const res = await dims(id, 'cured', 100, 20, 10.2, t(26));
    const m = res.body.coupon.metrics;
    expect(res.body.coupon.resin).toMatchObject({ id: resin.id, curedDensityGcm3: 1.2 });
    expect(m.drySg).toBeCloseTo(0.5, 10);
    expect(m.dryDensityKgM3).toBeCloseTo(500, 8);
    expect(m.wpgPct).toBeCloseTo(60, 10);
    expect(m.wetUptakePct).toBeCloseTo(70, 10);
    expect(m.resinLoadingKgM3).toBeCloseTo(300, 8);
    expect(m.voidFillPct).toBeCloseTo(37.5, 8);
    expect(m.cureLossPct).toBeCloseTo(100 / 7, 8);
    expect(m.bulkingPct).toBeCloseTo(2, 8);
  });

  it('works out swelling and ASE against the controls of the same trial and species', async () => {
    const trial = h.database.db.insert(trials).values({ code: 'CT-ASE', title: 'ASE test', question: 'Does it swell less?' }).returning().get();
    const treated = await makeCoupon({ trialId: trial.id });
    const c1 = await makeCoupon({ trialId: trial.id, role: 'control' });
    const c2 = await makeCoupon({ trialId: trial.id, role: 'control' });
    // Controls swell 4 % and 6 % from dry; the treated coupon 1 % from cured: ASE = (5 − 1)/5 = 80 %.
    for (const [c, wet] of [
      [c1, 10.4],
      [c2, 10.6],
    ] as const) {
      await dims(c, 'dry', 100, 10, 10);
      await dims(c, 'wet-test', 100, 10, wet, t(5));
    }
    await dims(treated, 'cured', 100, 10, 10);
    await dims(treated, 'wet-test', 100, 10, 10.1, t(5));
    const list = await as.viewer.get(`/api/coupons/full?trialId=${trial.id}`);
    const byId = new Map(list.body.items.map((c: { id: number }) => [c.id, c]));
    const tr = byId.get(treated) as { metrics: { swellingPct: number }; antiSwell: { asePct: number; controlCount: number } };
    expect(tr.metrics.swellingPct).toBeCloseTo(1, 8);
    expect(tr.antiSwell.asePct).toBeCloseTo(80, 8);
    expect(tr.antiSwell.controlCount).toBe(2);
    expect((byId.get(c1) as { antiSwell: unknown }).antiSwell).toBeNull();
    // The detail answer finds the controls too, even though they are not in the request.
    expect((await as.viewer.get(`/api/coupons/${treated}`)).body.coupon.antiSwell.asePct).toBeCloseTo(80, 8);
  });
});

describe('corrections, deletions and history', () => {
  it('corrects a weighing by superseding it, keeping the old value and the reason in the audit log', async () => {
    const id = await makeCoupon();
    const first = await weigh(id, 'dry', 41.2);
    const oldId = first.body.weighing.id;
    const noReason = await as.technician.patch(`/api/weighings/${oldId}`).send({ massG: 42.1 });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fieldErrors.reason).toBeTruthy();
    const res = await as.technician.patch(`/api/weighings/${oldId}`).send({ massG: 42.1, reason: 'digits swapped when typing' });
    expect(res.status).toBe(200);
    const newId = res.body.weighing.id;
    expect(newId).not.toBe(oldId);
    expect(res.body.superseded).toMatchObject({ id: oldId, massG: 41.2, supersededBy: newId });
    expect(res.body.coupon.metrics.dryMassG).toBe(42.1);
    const old = h.database.db.select().from(weighings).where(eq(weighings.id, oldId)).get();
    expect(old).toMatchObject({ massG: 41.2, supersededBy: newId });
    const entry = h.database.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'weighing'), eq(auditLog.entityId, String(oldId)), eq(auditLog.action, 'correct')))
      .get();
    expect(entry).toMatchObject({ reason: 'digits swapped when typing', actorId: expect.any(Number) });
    expect((entry?.before as { massG: number }).massG).toBe(41.2);
    expect((entry?.after as { massG: number; id: number }).massG).toBe(42.1);
    const twice = await as.technician.patch(`/api/weighings/${oldId}`).send({ massG: 43, reason: 'again' });
    expect(twice.status).toBe(409);
    expect(twice.body.error.message).toMatch(new RegExp(`id ${newId}`));
    await weigh(id, 'cured', 60);
    const impossible = await as.technician.patch(`/api/weighings/${newId}`).send({ massG: 61, reason: 'scale drift' });
    expect(impossible.status).toBe(422);

    const history = await as.viewer.get(`/api/coupons/${id}/history`);
    expect(history.status).toBe(200);
    expect(history.body.weighings.map((w: { id: number; massG: number; supersededBy: number | null }) => [w.id, w.massG, w.supersededBy])).toEqual([
      [oldId, 41.2, newId],
      [newId, 42.1, null],
      [expect.any(Number), 60, null],
    ]);
    const actions = history.body.audit.map((a: { action: string; entity: string }) => `${a.action}:${a.entity}`);
    expect(actions).toEqual(['create:coupon', 'create:weighing', 'correct:weighing', 'create:weighing']);
    expect(history.body.audit[2]).toMatchObject({ reason: 'digits swapped when typing', actorName: expect.stringContaining('Teo') });
  });

  it('corrects a check within its own kind only', async () => {
    const id = await makeCoupon();
    const c = await dims(id, 'dry', 100, 20, 10);
    const wrong = await as.technician.patch(`/api/checks/${c.body.check.id}`).send({ moisturePct: 5, reason: 'oops' });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.fieldErrors.moisturePct).toBeTruthy();
    const res = await as.technician.patch(`/api/checks/${c.body.check.id}`).send({ thicknessMm: 12, reason: 'read the wrong face' });
    expect(res.status).toBe(200);
    expect(res.body.check).toMatchObject({ lengthMm: 100, widthMm: 20, thicknessMm: 12 });
    expect(res.body.coupon.metrics.dryVolumeCm3).toBeCloseTo(24, 10);
    const bad = await as.technician.patch(`/api/checks/${res.body.check.id}`).send({ thicknessMm: -1, reason: 'test' });
    expect(bad.status).toBe(422);
  });

  it('deletes softly with a reason, audited, and the reading stays in the history', async () => {
    const id = await makeCoupon();
    const w = await weigh(id, 'dry', 30);
    const noReason = await as.technician.delete(`/api/weighings/${w.body.weighing.id}`).send({});
    expect(noReason.status).toBe(400);
    const res = await as.technician.delete(`/api/weighings/${w.body.weighing.id}`).send({ reason: 'belongs to another coupon' });
    expect(res.status).toBe(200);
    expect(res.body.coupon.weighings).toEqual([]);
    expect(res.body.coupon.metrics.dryMassG).toBeNull();
    const row = h.database.db.select().from(weighings).where(eq(weighings.id, w.body.weighing.id)).get();
    expect(row?.deletedAt).toBeTruthy();
    expect(row?.massG).toBe(30);
    const again = await as.technician.delete(`/api/weighings/${w.body.weighing.id}`).send({ reason: 'again' });
    expect(again.status).toBe(409);
    const c = await dims(id, 'dry', 100, 20, 10);
    expect((await as.technician.delete(`/api/checks/${c.body.check.id}`).send({ reason: 'measured the wrong piece' })).status).toBe(200);
    const history = (await as.viewer.get(`/api/coupons/${id}/history`)).body;
    expect(history.weighings[0].deletedAt).toBeTruthy();
    expect(history.checks[0].deletedAt).toBeTruthy();
    expect(history.audit.filter((a: { action: string }) => a.action === 'delete').map((a: { reason: string }) => a.reason)).toEqual([
      'belongs to another coupon',
      'measured the wrong piece',
    ]);
  });
});

describe('the entry grid’s batch save', () => {
  it('writes every entry in one transaction and answers the coupons with their metrics', async () => {
    const a = await makeCoupon();
    const b = await makeCoupon();
    const res = await as.technician.post('/api/coupons/measurements').send({
      entries: [
        {
          couponId: a,
          weighings: [
            { stage: 'dry', massG: 10, measuredAt: t(0) },
            { stage: 'cured', massG: 15, measuredAt: t(30) },
          ],
          checks: [{ kind: 'dimension', stage: 'dry', measuredAt: t(0), lengthMm: 100, widthMm: 20, thicknessMm: 10 }],
        },
        { couponId: b, weighings: [{ stage: 'dry', massG: 11, measuredAt: t(0) }] },
      ],
    });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.written).toEqual({ weighings: 3, checks: 1 });
    const ca = res.body.coupons.find((c: { id: number }) => c.id === a);
    expect(ca.metrics.wpgPct).toBeCloseTo(50, 10);
    expect(ca.metrics.resinLoadingKgM3).toBeCloseTo(250, 8);
    expect(
      h.database.db
        .select({ n: count() })
        .from(auditLog)
        .where(and(eq(auditLog.entity, 'weighing'), eq(auditLog.action, 'create')))
        .get()!.n,
    ).toBeGreaterThan(2);
  });

  it('writes nothing when one entry is bad, and names the entry and field', async () => {
    const ids = [await makeCoupon(), await makeCoupon(), await makeCoupon(), await makeCoupon()];
    const before = h.database.db.select({ n: count() }).from(weighings).get()!.n;
    const beforeChecks = h.database.db.select({ n: count() }).from(checks).get()!.n;
    const beforeAudit = h.database.db.select({ n: count() }).from(auditLog).get()!.n;
    const entries = ids.map((couponId) => ({
      couponId,
      weighings: [{ stage: 'dry', massG: 20, measuredAt: t(0) }],
      checks: [{ kind: 'moisture', stage: 'dry', measuredAt: t(0), moisturePct: 2 }],
    }));
    entries[3]!.weighings.push({ stage: 'cured', massG: 19, measuredAt: t(30) });
    const res = await as.technician.post('/api/coupons/measurements').send({ entries });
    expect(res.status).toBe(422);
    expect(res.body.error.fieldErrors['entries.3.weighings.1.massG'][0]).toMatch(/cannot be below the dry mass/);
    expect(res.body.error.message).toMatch(/^entries\.3\.weighings\.1:/);
    expect(h.database.db.select({ n: count() }).from(weighings).get()!.n).toBe(before);
    expect(h.database.db.select({ n: count() }).from(checks).get()!.n).toBe(beforeChecks);
    expect(h.database.db.select({ n: count() }).from(auditLog).get()!.n).toBe(beforeAudit);

    const shape = await as.technician
      .post('/api/coupons/measurements')
      .send({ entries: [{ couponId: ids[0], weighings: [{ stage: 'dry', massG: 'heavy', measuredAt: t(0) }] }] });
    expect(shape.status).toBe(400);
    expect(shape.body.error.fieldErrors['entries.0.weighings.0.massG']).toBeTruthy();
    const missing = await as.technician.post('/api/coupons/measurements').send({ entries: [{ couponId: 999999 }] });
    expect(missing.status).toBe(422);
    expect(missing.body.error.fieldErrors['entries.0.couponId']).toBeTruthy();
  });

  it('reports every bad reading of the batch at once, so the grid can mark all of them', async () => {
    const ids = [await makeCoupon(), await makeCoupon(), await makeCoupon()];
    const before = h.database.db.select({ n: count() }).from(weighings).get()!.n;
    const res = await as.technician.post('/api/coupons/measurements').send({
      entries: [
        {
          couponId: ids[0],
          weighings: [
            { stage: 'dry', massG: 20, measuredAt: t(0) },
            { stage: 'cured', massG: 18, measuredAt: t(30) },
          ],
        },
        { couponId: ids[1], weighings: [{ stage: 'dry', massG: 20, measuredAt: t(0) }] },
        {
          couponId: ids[2],
          weighings: [
            { stage: 'dry', massG: 20, measuredAt: t(0) },
            { stage: 'soaked', massG: 5, measuredAt: t(30) },
          ],
        },
      ],
    });
    expect(res.status).toBe(422);
    expect(Object.keys(res.body.error.fieldErrors).sort()).toEqual(['entries.0.weighings.1.massG', 'entries.2.weighings.1.massG']);
    expect(res.body.error.message).toMatch(/^2 readings have problems, nothing was saved/);
    expect(h.database.db.select({ n: count() }).from(weighings).get()!.n).toBe(before);
  });
});

describe('photos', () => {
  it('takes a real PNG, stores it under a generated name and serves it only to signed-in users', async () => {
    const id = await makeCoupon();
    const png = tinyPng();
    const res = await as.technician.post(`/api/coupons/${id}/photos`).field('kind', 'after').field('caption', 'end grain').attach('file', png, 'my blank.png');
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.photo).toMatchObject({ couponId: id, kind: 'after', caption: 'end grain', mimeType: 'image/png', originalName: 'my blank.png' });
    // Stored under a name of the app's making, never the uploader's, with the bytes' hash.
    const stored = h.database.db.select().from(photos).where(eq(photos.id, res.body.photo.id)).get();
    expect(stored?.fileName).toMatch(/^[\w-]+\.png$/);
    expect(stored?.fileName).not.toContain('blank');
    expect(stored?.sha256).toMatch(/^[0-9a-f]{64}$/);
    const got = await as.viewer.get(res.body.photo.url).buffer(true);
    expect(got.status).toBe(200);
    expect(got.headers['content-type']).toBe('image/png');
    expect(got.headers['x-content-type-options']).toBe('nosniff');
    // Stored re-encoded (photo-safety.test.ts): the same one pixel, not necessarily the same bytes.
    expect((got.body as Buffer).length).toBe(res.body.photo.bytes);
    expect([
      ...(await sharp(got.body as Buffer)
        .raw()
        .toBuffer()),
    ]).toEqual([200, 150, 90]);
    expect((await h.agent().get(res.body.photo.url)).status).toBe(401);
    const detail = await as.viewer.get(`/api/coupons/${id}`);
    expect(detail.body.coupon.photos.map((p: { id: number }) => p.id)).toEqual([res.body.photo.id]);
    const run = await as.technician.post('/api/runs').send({ chamber: 'Photo chamber' });
    const runPhoto = await as.technician.post(`/api/runs/${run.body.run.id}/photos`).attach('file', png, 'chamber.png');
    expect(runPhoto.status).toBe(201);
    expect((await as.viewer.get(`/api/runs/${run.body.run.id}`)).body.run.photos).toHaveLength(1);
  });

  it('refuses a text file renamed .png, judging by content', async () => {
    const id = await makeCoupon();
    const res = await as.technician
      .post(`/api/coupons/${id}/photos`)
      .attach('file', Buffer.from('just some notes, not a picture\n'), { filename: 'notes.png', contentType: 'image/png' });
    expect(res.status).toBe(422);
    expect(res.body.error.fieldErrors.file[0]).toMatch(/notes\.png is not a JPEG, PNG or WebP image/);
  });

  it('refuses a file over 8 MB with 413 naming the file, and a missing file with 400', async () => {
    const id = await makeCoupon();
    const big = Buffer.concat([tinyPng(), Buffer.alloc(8 * 1024 * 1024)]);
    const res = await as.technician.post(`/api/coupons/${id}/photos`).attach('file', big, 'huge.png');
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('payload_too_large');
    expect(res.body.error.message).toMatch(/huge\.png is larger than the 8 MB limit/);
    const none = await as.technician.post(`/api/coupons/${id}/photos`).field('kind', 'before');
    expect(none.status).toBe(400);
    expect(none.body.error.fieldErrors.file).toBeTruthy();
    const kind = await as.technician.post(`/api/coupons/${id}/photos`).field('kind', 'selfie').attach('file', tinyPng(), 'a.png');
    expect(kind.status).toBe(400);
    expect(kind.body.error.fieldErrors.kind).toBeTruthy();
    expect((await as.technician.post('/api/coupons/999999/photos').attach('file', tinyPng(), 'a.png')).status).toBe(404);
  });
});
