import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { startHarness, type Harness } from '../../testing/harness';
import { auditLog } from '../../db/schema/admin';
import { resinLots, resins, species } from '../../db/schema/reference';
import { seedDemo } from '../../seed';
import { openDatabase } from '../../db/client';
import { runs } from '../../db/schema/runs';
import { weighings } from '../../db/schema/coupons';

type Agent = Awaited<ReturnType<Harness['signIn']>>;
type RoleName = 'admin' | 'reviewer' | 'technician' | 'viewer';
const ROLE_ORDER: RoleName[] = ['viewer', 'technician', 'reviewer', 'admin'];
const where = (res: { status: number }) => {
  const r = (res as unknown as { req: { method: string; path: string } }).req;
  return `${r.method} ${r.path}`;
};

const HOUR = 3_600_000;
const DAY = 24 * HOUR;
/** ISO time `h` hours from the real now (the app's clock is the real one in these tests). */
const hoursFromNow = (h: number) => new Date(Date.now() + h * HOUR).toISOString();
const daysAgo = (n: number) => new Date(Date.now() - n * DAY).toISOString().slice(0, 10);

let h: Harness;
let as: Record<RoleName, Agent>;
let seq = 0;
let speciesId: number;

beforeAll(async () => {
  h = await startHarness();
  as = {
    admin: await h.signIn('admin@demo.test'),
    reviewer: await h.signIn('reviewer@demo.test'),
    technician: await h.signIn('tech@demo.test'),
    viewer: await h.signIn('viewer@demo.test'),
  };
  speciesId = h.database.db.select().from(species).where(eq(species.commonName, 'Maple, red')).get()!.id;
});
afterAll(async () => {
  await h.close();
});

/** A resin and a lot written straight into the tables: this suite tests runs, not the reference screens. */
function makeLot(opts: { activatedDaysAgo?: number; cureMinC?: number; cureMaxC?: number; shelfLifeDays?: number } = {}) {
  seq++;
  const db = h.database.db;
  const resin = db
    .insert(resins)
    .values({
      name: `Runs test resin ${seq}`,
      kind: 'test blend',
      liquidDensityGcm3: 1.05,
      curedDensityGcm3: 1.2,
      // 200–250 °F, the window as the trade states it.
      cureMinC: opts.cureMinC ?? ((200 - 32) * 5) / 9,
      cureMaxC: opts.cureMaxC ?? ((250 - 32) * 5) / 9,
      shelfLifeDays: opts.shelfLifeDays ?? 365,
    })
    .returning()
    .get();
  return db
    .insert(resinLots)
    .values({ resinId: resin.id, code: `RT-LOT-${seq}`, activatedAt: daysAgo(opts.activatedDaysAgo ?? 10), volumeMl: 1000 })
    .returning()
    .get();
}

async function makeCoupon(role: 'treated' | 'control' = 'treated'): Promise<number> {
  seq++;
  const res = await as.technician.post('/api/coupons').send({ tag: `RT-${seq}`, speciesId, role });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.coupon.id;
}

async function makeRun(body: Record<string, unknown> = {}): Promise<number> {
  const res = await as.technician.post('/api/runs').send({ chamber: 'Test chamber', ...body });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.run.id;
}

async function stage(runId: number, body: Record<string, unknown>, expected = 200) {
  const res = await as.technician.post(`/api/runs/${runId}/stages`).send(body);
  expect(res.status, JSON.stringify(res.body)).toBe(expected);
  return res;
}

describe('runs routes: who may do what', () => {
  it('answers 401 on every run route without a session', async () => {
    const anon = h.agent();
    const calls = [
      anon.get('/api/runs'),
      anon.post('/api/runs').send({ chamber: 'x' }),
      anon.get('/api/runs/1'),
      anon.patch('/api/runs/1').send({ notes: 'x' }),
      anon.post('/api/runs/1/stages').send({ stage: 'vacuum', startedAt: hoursFromNow(0) }),
      anon.get('/api/runs/1/checks'),
      anon.get('/api/bench'),
    ];
    for (const res of await Promise.all(calls)) {
      expect(res.status, where(res)).toBe(401);
      expect(res.body.error.code).toBe('unauthenticated');
    }
  });

  it('lets every role read and only technicians and above write', async () => {
    const runId = await makeRun();
    const reads = (a: Agent) => [a.get('/api/runs'), a.get(`/api/runs/${runId}`), a.get(`/api/runs/${runId}/checks`), a.get('/api/bench')];
    for (const role of ROLE_ORDER) {
      for (const res of await Promise.all(reads(as[role]))) expect(res.status, `${role} ${where(res)}`).toBe(200);
    }
    const writes = (a: Agent, i: number) => [
      a.post('/api/runs').send({ chamber: `Role chamber ${i}` }),
      a.patch(`/api/runs/${runId}`).send({ notes: `note ${i}` }),
    ];
    for (const [i, role] of ROLE_ORDER.entries()) {
      const allowed = role !== 'viewer';
      for (const res of await Promise.all(writes(as[role], i))) {
        if (allowed) expect([200, 201], `${role} ${where(res)} ${JSON.stringify(res.body)}`).toContain(res.status);
        else {
          expect(res.status, `${role} ${where(res)}`).toBe(403);
          expect(res.body.error.code).toBe('forbidden');
        }
      }
    }
    // Stage writes, one role at a time on its own run, so the stage order does not get in the way.
    for (const role of ROLE_ORDER) {
      const own = await makeRun();
      const res = await as[role].post(`/api/runs/${own}/stages`).send({ stage: 'vacuum', startedAt: hoursFromNow(-1) });
      expect(res.status, `${role} ${where(res)}`).toBe(role === 'viewer' ? 403 : 200);
    }
  });
});

describe('creating and editing a run', () => {
  it('copies the shop altitude, generates a code, and takes coupons', async () => {
    const lot = makeLot();
    const c1 = await makeCoupon();
    const c2 = await makeCoupon();
    const res = await as.technician.post('/api/runs').send({ chamber: 'Chamber X', resinLotId: lot.id, couponIds: [c1, c2] });
    expect(res.status).toBe(201);
    const run = res.body.run;
    expect(run.altitudeM).toBe(1600); // the demo shop's altitude setting
    expect(run.code).toMatch(/^R\d{2}-\d{3}$/);
    expect(run.coupons.map((c: { id: number }) => c.id).sort()).toEqual([c1, c2].sort());
    expect(run.lot).toMatchObject({ id: lot.id, code: lot.code });
    expect(run.progress).toEqual({ current: null, currentOpen: false, status: 'planned' });
    expect(run.startableStages).toEqual(['drying', 'vacuum']);
    const given = await as.technician.post('/api/runs').send({ chamber: 'Chamber Y', altitudeM: 250 });
    expect(given.body.run.altitudeM).toBe(250);
  });

  it('refuses a coupon already in another run with 409, and a control coupon with 422', async () => {
    const c = await makeCoupon();
    const first = await makeRun({ couponIds: [c] });
    const second = await as.technician.post('/api/runs').send({ chamber: 'Other', couponIds: [c] });
    expect(second.status).toBe(409);
    expect(second.body.error.fieldErrors.couponIds[0]).toMatch(/already in run/);
    const patch = await as.technician.patch(`/api/runs/${await makeRun()}`).send({ addCouponIds: [c] });
    expect(patch.status).toBe(409);
    expect(patch.body.error.fieldErrors.addCouponIds).toBeTruthy();
    const control = await makeCoupon('control');
    const ctl = await as.technician.patch(`/api/runs/${first}`).send({ addCouponIds: [control] });
    expect(ctl.status).toBe(422);
    expect(ctl.body.error.fieldErrors.addCouponIds[0]).toMatch(/control/);
  });

  it('adds and removes coupons, but keeps a coupon that has its cured weighing from the run', async () => {
    const a = await makeCoupon();
    const b = await makeCoupon();
    const runId = await makeRun({ couponIds: [a] });
    const added = await as.technician.patch(`/api/runs/${runId}`).send({ addCouponIds: [b] });
    expect(added.status).toBe(200);
    expect(added.body.run.coupons).toHaveLength(2);
    const removed = await as.technician.patch(`/api/runs/${runId}`).send({ removeCouponIds: [a] });
    expect(removed.body.run.coupons.map((c: { id: number }) => c.id)).toEqual([b]);
    expect((await as.viewer.get(`/api/coupons/${a}`)).body.coupon.runId).toBeNull();
    await as.technician.post(`/api/coupons/${b}/weighings`).send({ stage: 'dry', massG: 30, measuredAt: hoursFromNow(-2) });
    await as.technician.post(`/api/coupons/${b}/weighings`).send({ stage: 'cured', massG: 45, measuredAt: hoursFromNow(-1) });
    const refused = await as.technician.patch(`/api/runs/${runId}`).send({ removeCouponIds: [b] });
    expect(refused.status).toBe(409);
    expect(refused.body.error.fieldErrors.removeCouponIds[0]).toMatch(/cured/);
  });

  it('names the field of a bad body and refuses unknown fields', async () => {
    const missing = await as.technician.post('/api/runs').send({});
    expect(missing.status).toBe(400);
    expect(missing.body.error.fieldErrors.chamber).toBeTruthy();
    const unknown = await as.technician.post('/api/runs').send({ chamber: 'x', pressure: 3 });
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.fieldErrors.pressure).toEqual(['Unknown field']);
    const alt = await as.technician.post('/api/runs').send({ chamber: 'x', altitudeM: 9000 });
    expect(alt.body.error.fieldErrors.altitudeM[0]).toMatch(/5,000 m \(16,404 ft\)/);
    const lot = await as.technician.post('/api/runs').send({ chamber: 'x', resinLotId: 999999 });
    expect(lot.status).toBe(422);
    expect(lot.body.error.fieldErrors.resinLotId).toBeTruthy();
    const code = await as.technician.post('/api/runs').send({ chamber: 'x', code: 'RT-DUP' });
    expect(code.status).toBe(201);
    const dup = await as.technician.post('/api/runs').send({ chamber: 'x', code: 'RT-DUP' });
    expect(dup.status).toBe(409);
    expect((await as.viewer.get('/api/runs/999999')).status).toBe(404);
    expect((await as.viewer.get('/api/runs?sort=colour')).body.error.fieldErrors.sort).toBeTruthy();
  });

  it('writes the audit log for a run and its stages', async () => {
    const runId = await makeRun();
    await stage(runId, { stage: 'vacuum', startedAt: hoursFromNow(-2) });
    const entries = h.database.db.select().from(auditLog).where(eq(auditLog.entity, 'run_stage')).all();
    expect(entries.some((e) => (e.after as { runId: number }).runId === runId && e.action === 'create')).toBe(true);
    expect(
      h.database.db
        .select()
        .from(auditLog)
        .where(and(eq(auditLog.entity, 'run'), eq(auditLog.entityId, String(runId))))
        .all(),
    ).toHaveLength(1);
  });
});

describe('the stage order drying → vacuum → soak → drain → cure', () => {
  it('refuses a cure before a soak has started, and a soak while the vacuum is still on', async () => {
    const runId = await makeRun();
    const early = await stage(runId, { stage: 'cure', startedAt: hoursFromNow(-1) }, 409);
    expect(early.body.error.message).toMatch(/Cure cannot start before the vacuum stage/);
    await stage(runId, { stage: 'vacuum', startedAt: hoursFromNow(-10) });
    const cure = await stage(runId, { stage: 'cure', startedAt: hoursFromNow(-1) }, 409);
    expect(cure.body.error.message).toMatch(/End the vacuum stage/);
    const soak = await stage(runId, { stage: 'soak', startedAt: hoursFromNow(-5) }, 409);
    expect(soak.body.error.fieldErrors.stage[0]).toMatch(/End the vacuum stage before starting soak/);
    await stage(runId, { stage: 'vacuum', startedAt: hoursFromNow(-10), endedAt: hoursFromNow(-6) });
    const noCure = await stage(runId, { stage: 'cure', startedAt: hoursFromNow(-1) }, 409);
    expect(noCure.body.error.message).toMatch(/soak/);
    const res = await stage(runId, { stage: 'soak', startedAt: hoursFromNow(-6) });
    expect(res.body.run.progress).toEqual({ current: 'soak', currentOpen: true, status: 'in-progress' });
    expect(res.body.run.startableStages).toEqual([]);
    const back = await stage(runId, { stage: 'drying', startedAt: hoursFromNow(-1) }, 409);
    expect(back.body.error.message).toMatch(/only goes forward/);
  });

  it('answers 422 for an end before the start, and keeps the stage fields to their stage', async () => {
    const runId = await makeRun();
    const res = await stage(runId, { stage: 'vacuum', startedAt: hoursFromNow(-1), endedAt: hoursFromNow(-2) }, 422);
    expect(res.body.error.fieldErrors.endedAt).toBeTruthy();
    const oven = await stage(runId, { stage: 'vacuum', startedAt: hoursFromNow(-1), ovenSetC: 100 }, 400);
    expect(oven.body.error.fieldErrors.ovenSetC[0]).toMatch(/drying or cure/);
    const noZone = await stage(runId, { stage: 'vacuum', startedAt: '2026-03-01T10:00' }, 400);
    expect(noZone.body.error.fieldErrors.startedAt[0]).toMatch(/zone/);
  });
});

describe('gauge readings at the shop altitude', () => {
  // U.S. Standard Atmosphere 1976 troposphere in its customary published form, with h the geopotential
  // height: P = 101.325·(1 − 2.25577e-5·h)^5.25588 kPa; geopotential h = r₀z/(r₀ + z), r₀ = 6 356 766 m.
  const ambientKpa = (z: number) => {
    const r0 = 6356766;
    const hGeo = (r0 * z) / (r0 + z);
    return 101.325 * Math.pow(1 - 2.25577e-5 * hGeo, 5.25588);
  };
  const KPA_PER_INHG = 3.386389; // NIST SP 811 (2008), App. B

  it('stores absolute kPa and % vacuum for an inHg reading at 1600 m', async () => {
    const runId = await makeRun();
    const res = await stage(runId, { stage: 'vacuum', startedAt: hoursFromNow(-2), readings: [{ at: hoursFromNow(-1), gaugeValue: 24.0, gaugeUnit: 'inHg' }] });
    const reading = res.body.run.stages[0].readings[0];
    const ambient = ambientKpa(1600);
    const absolute = ambient - 24.0 * KPA_PER_INHG;
    expect(res.body.run.ambientKpa).toBeCloseTo(ambient, 2);
    expect(reading.gaugeValue).toBe(24);
    expect(reading.gaugeUnit).toBe('inHg');
    expect(Math.abs(reading.absoluteKpa - absolute)).toBeLessThan(0.005);
    expect(Math.abs(reading.percentVacuum - ((ambient - absolute) / ambient) * 100)).toBeLessThan(0.01);
  });

  it('accepts 25.0 inHg at 1600 m as 0 kPa absolute (a high-pressure day), refuses 27.0 inHg (beyond the 5 % the weather adds; 422 naming the reading)', async () => {
    // 25.0 inHg = 84.66 kPa, above the ≈ 83.5 kPa standard ambient at 1600 m but within 5 % of it.
    expect(25.0 * KPA_PER_INHG).toBeGreaterThan(ambientKpa(1600));
    const ok = await stage(await makeRun(), {
      stage: 'vacuum',
      startedAt: hoursFromNow(-2),
      readings: [{ at: hoursFromNow(-1), gaugeValue: 25.0, gaugeUnit: 'inHg' }],
    });
    expect(ok.body.run.stages[0].readings[0]).toMatchObject({ absoluteKpa: 0, percentVacuum: 100 });
    // 27.0 inHg = 91.43 kPa, more than 1.05 × 83.5 = 87.7 kPa: a unit slip or a wrong altitude.
    const runId = await makeRun();
    const res = await stage(
      runId,
      {
        stage: 'vacuum',
        startedAt: hoursFromNow(-2),
        readings: [
          { at: hoursFromNow(-1.5), gaugeValue: 23.0, gaugeUnit: 'inHg' },
          { at: hoursFromNow(-1), gaugeValue: 27.0, gaugeUnit: 'inHg' },
        ],
      },
      422,
    );
    expect(res.body.error.fieldErrors['readings.1.gaugeValue'][0]).toMatch(
      /more vacuum than the .* ambient pressure at 1600 m \(5249 ft\) by more than the 5 %/,
    );
    // Nothing of the refused request was written.
    expect((await as.viewer.get(`/api/runs/${runId}`)).body.run.stages).toEqual([]);
  });

  it('works 25.0 inHg out at sea level and accepts kPa gauges', async () => {
    const runId = await makeRun({ altitudeM: 0 });
    const res = await stage(runId, {
      stage: 'vacuum',
      startedAt: hoursFromNow(-2),
      readings: [
        { at: hoursFromNow(-1.5), gaugeValue: 25.0, gaugeUnit: 'inHg' },
        { at: hoursFromNow(-1), gaugeValue: 90, gaugeUnit: 'kPa' },
      ],
    });
    const [r1, r2] = res.body.run.stages[0].readings;
    expect(Math.abs(r1.absoluteKpa - (101.325 - 25.0 * KPA_PER_INHG))).toBeLessThan(0.005);
    expect(Math.abs(r2.absoluteKpa - 11.325)).toBeLessThan(1e-9);
    // Sending the same readings again does not double them.
    const again = await stage(runId, { stage: 'vacuum', startedAt: hoursFromNow(-2), readings: [{ at: r1.at, gaugeValue: 25.0, gaugeUnit: 'inHg' }] });
    expect(again.body.run.stages[0].readings).toHaveLength(2);
  });

  it('recomputes absolute pressures when the run’s altitude is corrected', async () => {
    const runId = await makeRun({ altitudeM: 0 });
    await stage(runId, { stage: 'vacuum', startedAt: hoursFromNow(-2), readings: [{ at: hoursFromNow(-1), gaugeValue: 20, gaugeUnit: 'inHg' }] });
    const res = await as.technician.patch(`/api/runs/${runId}`).send({ altitudeM: 1600, reason: 'the run was at the shop, not at sea level' });
    expect(res.status).toBe(200);
    expect(Math.abs(res.body.run.stages[0].readings[0].absoluteKpa - (ambientKpa(1600) - 20 * KPA_PER_INHG))).toBeLessThan(0.005);
    const bad = await as.technician.patch(`/api/runs/${runId}`).send({ altitudeM: 4500, reason: 'typed wrong' });
    expect(bad.status).toBe(422); // 20 inHg is more than the whole atmosphere at 4500 m
  });
});

describe("the shop's barometer in place of the standard atmosphere", () => {
  const KPA_PER_INHG = 3.386389; // NIST SP 811 (2008), App. B

  it('works a reading out against the barometer: 30.0 inHg on a 102.5 kPa day at sea level is 0.91 kPa absolute', async () => {
    // Against the standard 101.325 kPa (USSA 1976 sea level) 30.0 inHg = 101.59 kPa would be clamped to 0;
    // against the barometer it is 102.5 − 101.5917 = 0.9083 kPa (by hand).
    const runId = await makeRun({ altitudeM: 0 });
    const res = await stage(runId, {
      stage: 'vacuum',
      startedAt: hoursFromNow(-2),
      barometerKpa: 102.5,
      readings: [{ at: hoursFromNow(-1), gaugeValue: 30.0, gaugeUnit: 'inHg' }],
    });
    const vac = res.body.run.stages[0];
    expect(vac).toMatchObject({ barometerKpa: 102.5, ambientKpa: 102.5, ambientSource: 'barometer' });
    expect(Math.abs(vac.readings[0].absoluteKpa - (102.5 - 30 * KPA_PER_INHG))).toBeLessThan(1e-9);
    expect(Math.abs(vac.readings[0].percentVacuum - ((30 * KPA_PER_INHG) / 102.5) * 100)).toBeLessThan(1e-9);
    // The run's own ambient stays the standard atmosphere at its altitude.
    expect(res.body.run.ambientKpa).toBeCloseTo(101.325, 9);
  });

  it('a stage without a barometer names the standard atmosphere as its ambient', async () => {
    const res = await stage(await makeRun({ altitudeM: 0 }), { stage: 'vacuum', startedAt: hoursFromNow(-2) });
    expect(res.body.run.stages[0]).toMatchObject({ barometerKpa: null, ambientSource: 'standard-atmosphere' });
    expect(res.body.run.stages[0].ambientKpa).toBeCloseTo(101.325, 9); // USSA 1976 sea level
  });

  it('refuses a barometer outside 50–110 kPa and one on another stage, naming the field', async () => {
    const runId = await makeRun({ altitudeM: 0 });
    // 29.9 typed in a kPa box: inHg by mistake.
    const slip = await stage(runId, { stage: 'vacuum', startedAt: hoursFromNow(-9), barometerKpa: 29.9 }, 400);
    expect(slip.body.error.fieldErrors.barometerKpa[0]).toMatch(/at least 50 kPa/);
    await stage(runId, { stage: 'vacuum', startedAt: hoursFromNow(-9), endedAt: hoursFromNow(-8) });
    const soak = await stage(runId, { stage: 'soak', startedAt: hoursFromNow(-8), barometerKpa: 101 }, 400);
    expect(soak.body.error.fieldErrors.barometerKpa[0]).toMatch(/vacuum stage/);
  });

  it('a reading beyond the barometer by more than the allowance is refused with the barometer named', async () => {
    // 30.0 inHg = 101.59 kPa against a 95 kPa barometer: beyond 1.05 × 95 = 99.75 kPa.
    const res = await stage(
      await makeRun({ altitudeM: 0 }),
      { stage: 'vacuum', startedAt: hoursFromNow(-2), barometerKpa: 95, readings: [{ at: hoursFromNow(-1), gaugeValue: 30.0, gaugeUnit: 'inHg' }] },
      422,
    );
    expect(res.body.error.fieldErrors['readings.0.gaugeValue'][0]).toMatch(/the shop's barometer reading of 95\.00 kPa/);
  });

  it('a barometer added after readings were worked out takes a correction with a reason, which moves them and keeps the old version', async () => {
    const runId = await makeRun({ altitudeM: 0 });
    await stage(runId, { stage: 'vacuum', startedAt: hoursFromNow(-2), readings: [{ at: hoursFromNow(-1), gaugeValue: 25.0, gaugeUnit: 'inHg' }] });
    const refused = await stage(runId, { stage: 'vacuum', startedAt: hoursFromNow(-2), barometerKpa: 102 }, 409);
    expect(refused.body.error.fieldErrors.barometerKpa[0]).toMatch(/correct the stage and give the reason/);
    const fixed = await as.technician
      .post(`/api/runs/${runId}/stages/vacuum/corrections`)
      .send({ barometerKpa: 102, reason: 'the barometer reading was on the bench sheet' });
    expect(fixed.status, JSON.stringify(fixed.body)).toBeLessThan(300);
    const run = (await as.viewer.get(`/api/runs/${runId}`)).body.run;
    expect(Math.abs(run.stages[0].readings[0].absoluteKpa - (102 - 25 * KPA_PER_INHG))).toBeLessThan(1e-9);
    const history = (await as.viewer.get(`/api/runs/${runId}/history`)).body;
    expect(history.versions[0].values.barometerKpa).toBeNull();
    expect(Math.abs(history.versions[0].readings[0].absoluteKpa - (101.325 - 25 * KPA_PER_INHG))).toBeLessThan(1e-9);
    // A different barometer sent with the stage form again is a correction too.
    await stage(runId, { stage: 'vacuum', startedAt: hoursFromNow(-2), barometerKpa: 100 }, 409);
  });

  it('a corrected altitude leaves the readings of a stage with a barometer where they were', async () => {
    const runId = await makeRun({ altitudeM: 0 });
    const first = await stage(runId, {
      stage: 'vacuum',
      startedAt: hoursFromNow(-2),
      barometerKpa: 84,
      readings: [{ at: hoursFromNow(-1), gaugeValue: 20, gaugeUnit: 'inHg' }],
    });
    const res = await as.technician.patch(`/api/runs/${runId}`).send({ altitudeM: 1600 });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.run.stages[0].readings[0].absoluteKpa).toBe(first.body.run.stages[0].readings[0].absoluteKpa);
  });
});

describe('rule checks on crafted runs', () => {
  async function fullRun(opts: { vacuumH: number; soakH: number; cureC: number; cureH?: number; lotAgeDays?: number; dryingEndMass?: number }) {
    const lot = makeLot({ activatedDaysAgo: opts.lotAgeDays ?? 30 });
    const coupon = await makeCoupon();
    // Drying checks 4 h apart: 50.00 → 49.98 g is a 0.04 % change (constant under 2 h / 0.1 %).
    await as.technician.post(`/api/coupons/${coupon}/weighings`).send({ stage: 'drying-check', massG: 50.0, measuredAt: hoursFromNow(-60) });
    await as.technician
      .post(`/api/coupons/${coupon}/weighings`)
      .send({ stage: 'drying-check', massG: opts.dryingEndMass ?? 49.98, measuredAt: hoursFromNow(-56) });
    await as.technician.post(`/api/coupons/${coupon}/weighings`).send({ stage: 'dry', massG: opts.dryingEndMass ?? 49.98, measuredAt: hoursFromNow(-55) });
    const runId = await makeRun({ resinLotId: lot.id, couponIds: [coupon] });
    let t = -54;
    await stage(runId, { stage: 'drying', startedAt: hoursFromNow(-62), endedAt: hoursFromNow(-55) });
    await stage(runId, { stage: 'vacuum', startedAt: hoursFromNow(t), endedAt: hoursFromNow(t + opts.vacuumH) });
    t += opts.vacuumH;
    await stage(runId, { stage: 'soak', startedAt: hoursFromNow(t), endedAt: hoursFromNow(t + opts.soakH) });
    t += opts.soakH;
    await stage(runId, {
      stage: 'cure',
      startedAt: hoursFromNow(t + 1),
      endedAt: hoursFromNow(t + 1 + (opts.cureH ?? 3)),
      ovenSetC: 110,
      ovenMeasuredC: opts.cureC,
    });
    const res = await as.viewer.get(`/api/runs/${runId}/checks`);
    expect(res.status).toBe(200);
    return Object.fromEntries(res.body.checks.map((c: { rule: string; status: string; reason: string }) => [c.rule, c]));
  }

  it('passes a run that keeps the rules', async () => {
    const c = await fullRun({ vacuumH: 4, soakH: 10, cureC: 105 });
    expect(Object.fromEntries(Object.entries(c).map(([k, v]) => [k, (v as { status: string }).status]))).toEqual({
      'dry-weighings': 'ok',
      'drying-constant-mass': 'ok',
      'lot-shelf-life': 'ok',
      'soak-time': 'ok',
      'cure-temperature': 'ok',
      'cure-time': 'ok',
    });
  });

  it('fails a soak shorter than twice the vacuum', async () => {
    const c = await fullRun({ vacuumH: 5, soakH: 8, cureC: 105 });
    expect(c['soak-time'].status).toBe('fail');
    expect(c['soak-time'].reason).toMatch(/less than twice the 5 h vacuum/);
  });

  it('fails a cure at 130 °C by the oven thermometer', async () => {
    const c = await fullRun({ vacuumH: 4, soakH: 10, cureC: 130 });
    expect(c['cure-temperature'].status).toBe('fail');
    expect(c['cure-temperature'].reason).toMatch(/130 °C/);
  });

  it("passes an oven at exactly 250 °F and words the window in the reader's units", async () => {
    const c = await fullRun({ vacuumH: 4, soakH: 10, cureC: ((250 - 32) * 5) / 9 });
    expect(c['cure-temperature'].status).toBe('ok');
    expect(c['cure-temperature'].reason).toMatch(/read 121\.11 °C, inside 93\.3–121\.1 °C/);
    expect((await as.viewer.patch('/api/auth/me').send({ unitSystem: 'us' })).status).toBe(200);
    try {
      const runs = await as.viewer.get('/api/runs?pageSize=1&sort=-createdAt');
      const id = runs.body.items[0].id;
      const us = (await as.viewer.get(`/api/runs/${id}/checks`)).body.checks.find((x: { rule: string }) => x.rule === 'cure-temperature');
      expect(us.reason).toMatch(/read 250 °F, inside 200–250 °F/);
    } finally {
      await as.viewer.patch('/api/auth/me').send({ unitSystem: 'metric' });
    }
  });

  it('fails a run made with an expired lot', async () => {
    const c = await fullRun({ vacuumH: 4, soakH: 10, cureC: 105, lotAgeDays: 400 });
    expect(c['lot-shelf-life'].status).toBe('fail');
    expect(c['lot-shelf-life'].reason).toMatch(/past its 365-day shelf life/);
  });

  it('warns when drying did not reach constant mass', async () => {
    const c = await fullRun({ vacuumH: 4, soakH: 10, cureC: 105, dryingEndMass: 49.5 });
    expect(c['drying-constant-mass'].status).toBe('warn');
  });

  it('fails a cure shorter than 2 h', async () => {
    const c = await fullRun({ vacuumH: 4, soakH: 10, cureC: 105, cureH: 1.5 });
    expect(c['cure-time'].status).toBe('fail');
  });

  it('fails coupons that went under vacuum without a dry weighing', async () => {
    const coupon = await makeCoupon();
    const runId = await makeRun({ couponIds: [coupon] });
    expect((await as.viewer.get(`/api/runs/${runId}/checks`)).body.checks.find((c: { rule: string }) => c.rule === 'dry-weighings').status).toBe('pending');
    await stage(runId, { stage: 'vacuum', startedAt: hoursFromNow(-1) });
    const check = (await as.viewer.get(`/api/runs/${runId}/checks`)).body.checks.find((c: { rule: string }) => c.rule === 'dry-weighings');
    expect(check).toMatchObject({ status: 'fail', couponIds: [coupon] });
  });
});

describe('timers, cautions and the bench', () => {
  it('says what is due next: the stage’s planned end and the soak minimum', async () => {
    const runId = await makeRun();
    await stage(runId, { stage: 'vacuum', startedAt: hoursFromNow(-5), endedAt: hoursFromNow(-1) });
    const res = await stage(runId, { stage: 'soak', startedAt: hoursFromNow(-1), plannedMinutes: 720 });
    const due = res.body.run.due;
    expect(due.next.kind).toBe('soak-minimum');
    // vacuum 4 h, ended 1 h ago → soak may end 8 h after that
    expect(Math.abs(Date.parse(due.next.dueAt) - (Date.now() + 7 * HOUR))).toBeLessThan(60_000);
    expect(due.items.map((i: { kind: string }) => i.kind)).toEqual(['soak-minimum', 'stage-end']);
  });

  it('includes the cautions for each stage, with the reminder of what governs', async () => {
    const run = (await as.viewer.get(`/api/runs/${await makeRun()}`)).body.run;
    expect(run.cautions.vacuum.map((c: { id: string }) => c.id)).toEqual(['vacuum-chamber', 'resin-handling', 'governing-rules']);
    expect(run.cautions.cure.map((c: { text: string }) => c.text).join(' ')).toMatch(/never used for food.*flammable/s);
    expect(run.cautions.drying.at(-1).text).toMatch(/safety data sheet, local fire and building codes and licensed practice/);
  });

  it('lists overdue stages, missing weighings and drying checks due, each with where to go', async () => {
    const a = await makeCoupon();
    const b = await makeCoupon();
    await as.technician.post(`/api/coupons/${a}/weighings`).send({ stage: 'drying-check', massG: 40, measuredAt: hoursFromNow(-3) });
    const runId = await makeRun({ couponIds: [a, b] });
    await stage(runId, { stage: 'drying', startedAt: hoursFromNow(-10), plannedMinutes: 8 * 60 });
    const bench = await as.viewer.get('/api/bench?withinHours=2');
    expect(bench.status).toBe(200);
    const mine = bench.body.items.filter((i: { runId: number }) => i.runId === runId);
    // One item per run and job, never one per coupon: the coupons are counted and the first ones named.
    const kinds = mine.map((i: { kind: string; couponCount: number }) => `${i.kind}:${i.couponCount}`).sort();
    expect(kinds).toEqual(['drying-check-due:2', 'stage-end:0', 'weighing-due:2']);
    const stageEnd = mine.find((i: { kind: string }) => i.kind === 'stage-end');
    expect(stageEnd).toMatchObject({ overdue: true, target: { entity: 'run', id: runId, form: 'stage', stage: 'drying' } });
    const weigh = mine.find((i: { kind: string }) => i.kind === 'weighing-due');
    expect(weigh.coupons.map((c: { id: number }) => c.id).sort()).toEqual([a, b].sort());
    expect(weigh).toMatchObject({ weighingStage: 'dry', target: { entity: 'coupon', id: weigh.coupons[0].id, form: 'weighing', stage: 'dry' } });
    const drying = mine.find((i: { kind: string }) => i.kind === 'drying-check-due');
    // b has no drying check at all, so it comes first; a's last check was 3 h ago and the interval is 2 h.
    expect(drying).toMatchObject({ couponId: b, overdue: true, dueAt: null });
    expect(drying.coupons.map((c: { id: number }) => c.id)).toEqual([b, a]);
    const limited = await as.viewer.get('/api/bench?withinHours=2&limit=1');
    expect(limited.body.items).toHaveLength(1);
    expect(limited.body.total).toBeGreaterThanOrEqual(3);
    expect((await as.viewer.get('/api/bench?withinHours=100')).status).toBe(400);
  });

  it('asks for soaked weighings after the soak and cured ones after the cure', async () => {
    const c = await makeCoupon();
    await as.technician.post(`/api/coupons/${c}/weighings`).send({ stage: 'dry', massG: 30, measuredAt: hoursFromNow(-30) });
    const runId = await makeRun({ couponIds: [c] });
    await stage(runId, { stage: 'vacuum', startedAt: hoursFromNow(-20), endedAt: hoursFromNow(-16) });
    await stage(runId, { stage: 'soak', startedAt: hoursFromNow(-16), endedAt: hoursFromNow(-6) });
    const wanted = async () =>
      (await as.viewer.get('/api/bench')).body.items
        .filter((i: { runId: number; kind: string }) => i.runId === runId && i.kind === 'weighing-due')
        .map((i: { weighingStage: string }) => i.weighingStage);
    expect(await wanted()).toEqual(['soaked']);
    await as.technician.post(`/api/coupons/${c}/weighings`).send({ stage: 'soaked', massG: 50, measuredAt: hoursFromNow(-5.5) });
    await stage(runId, { stage: 'cure', startedAt: hoursFromNow(-5), endedAt: hoursFromNow(-2), ovenMeasuredC: 105 });
    expect(await wanted()).toEqual(['cured']);
  });
});

describe('listing runs', () => {
  it('paginates and filters by status', async () => {
    const open = await as.viewer.get('/api/runs?status=open&pageSize=200');
    expect(open.status).toBe(200);
    expect(open.body.items.every((r: { progress: { status: string } }) => r.progress.status !== 'finished')).toBe(true);
    const finished = await as.viewer.get('/api/runs?status=finished&pageSize=200');
    expect(finished.body.items.every((r: { progress: { status: string } }) => r.progress.status === 'finished')).toBe(true);
    const page = await as.viewer.get('/api/runs?pageSize=2&page=1&sort=code');
    expect(page.body).toMatchObject({ page: 1, pageSize: 2 });
    expect(page.body.items).toHaveLength(2);
    expect(page.body.total).toBeGreaterThan(2);
  });
});

describe("the list's check counts, remembered per run", () => {
  /** What the run list says, and what the run's own checks add up to: they must agree after every write. */
  async function counts(runId: number) {
    const code = (await as.viewer.get(`/api/runs/${runId}`)).body.run.code;
    const listed = (await as.viewer.get(`/api/runs?q=${code}`)).body.items.find((r: { id: number }) => r.id === runId).checkCounts;
    const tally = { ok: 0, warn: 0, fail: 0, pending: 0 };
    for (const c of (await as.viewer.get(`/api/runs/${runId}/checks`)).body.checks as { status: keyof typeof tally }[]) tally[c.status]++;
    return { listed, tally };
  }
  async function agree(...runIds: number[]) {
    for (const id of runIds) {
      const { listed, tally } = await counts(id);
      expect(listed, `run ${id}`).toEqual(tally);
    }
  }

  it('follows weighings, corrections, stages and coupons moved between runs', async () => {
    const a1 = await makeCoupon();
    const b1 = await makeCoupon();
    const runA = await makeRun({ couponIds: [a1] });
    const runB = await makeRun({ couponIds: [b1] });
    await agree(runA, runB);
    await stage(runA, { stage: 'vacuum', startedAt: hoursFromNow(-1) });
    await agree(runA, runB);
    const w = await as.technician.post(`/api/coupons/${b1}/weighings`).send({ stage: 'drying-check', massG: 50, measuredAt: hoursFromNow(-8) });
    expect(w.status, JSON.stringify(w.body)).toBe(201);
    await as.technician.post(`/api/coupons/${b1}/weighings`).send({ stage: 'drying-check', massG: 49.99, measuredAt: hoursFromNow(-3) });
    await as.technician.post(`/api/coupons/${b1}/weighings`).send({ stage: 'dry', massG: 49.99, measuredAt: hoursFromNow(-2) });
    await agree(runA, runB);
    const corrected = await as.technician.patch(`/api/weighings/${w.body.weighing.id}`).send({ massG: 52, reason: 'misread' });
    expect(corrected.status, JSON.stringify(corrected.body)).toBe(200);
    await agree(runA, runB);
    expect((await as.technician.patch(`/api/runs/${runB}`).send({ addCouponIds: [a1] })).status).toBe(409);
    expect((await as.technician.patch(`/api/runs/${runA}`).send({ removeCouponIds: [a1] })).status).toBe(200);
    expect((await as.technician.patch(`/api/runs/${runB}`).send({ addCouponIds: [a1] })).status).toBe(200);
    await agree(runA, runB);
  });
});

describe('the demo', () => {
  it('writes runs in different stages with gauge readings in inHg and weighings, the same every time', async () => {
    const db = h.database.db;
    const codes = db
      .select()
      .from(runs)
      .all()
      .filter((r) => /^R26-00\d$/.test(r.code));
    expect(codes.length).toBeGreaterThanOrEqual(3);
    const list = (await as.viewer.get('/api/runs?pageSize=200')).body.items.filter((r: { code: string }) => /^R26-00\d$/.test(r.code));
    const statuses = new Set(list.map((r: { progress: { current: string; status: string } }) => `${r.progress.status}:${r.progress.current}`));
    expect(statuses).toContain('finished:cure');
    expect(statuses).toContain('in-progress:soak');
    expect(statuses).toContain('in-progress:drying');
    const first = (await as.viewer.get(`/api/runs/${list.find((r: { progress: { status: string } }) => r.progress.status === 'finished').id}`)).body.run;
    expect(first.stages.find((s: { stage: string }) => s.stage === 'vacuum').readings[0].gaugeUnit).toBe('inHg');
    expect(first.notes).toMatch(/Demo data/);

    // A second seed of a fresh database with the same clock gives the same masses.
    const other = openDatabase(`${h.dir}/second.db`);
    const fixed = new Date('2026-05-01T12:00:00Z');
    const third = openDatabase(`${h.dir}/third.db`);
    seedDemo(other, { bcryptCost: 4, now: fixed });
    seedDemo(third, { bcryptCost: 4, now: fixed });
    const masses = (d: ReturnType<typeof openDatabase>) => d.db.select({ m: weighings.massG, s: weighings.stage }).from(weighings).all();
    expect(masses(other).length).toBeGreaterThan(100);
    expect(masses(other)).toEqual(masses(third));
    other.close();
    third.close();
  });
});
