import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { startHarness, type Harness } from '../../testing/harness';
import { auditLog } from '../../db/schema/admin';
import { coupons, weighings } from '../../db/schema/coupons';
import { resins, species } from '../../db/schema/reference';
import { trials } from '../../db/schema/trials';
import { DEMO_PLANNING_TRIAL_CODE, DEMO_TRIAL_CODE, demoTrialCoupons } from './trials.seed';

type Agent = Awaited<ReturnType<Harness['signIn']>>;
/** "METHOD /path" of the request behind a supertest answer, for assertion messages. */
const where = (res: { status: number }) => {
  const r = (res as unknown as { req: { method: string; path: string } }).req;
  return `${r.method} ${r.path}`;
};
let h: Harness;
let as: Record<'admin' | 'reviewer' | 'technician' | 'viewer', Agent>;

async function setUp() {
  h = await startHarness();
  as = {
    admin: await h.signIn('admin@demo.test'),
    reviewer: await h.signIn('reviewer@demo.test'),
    technician: await h.signIn('tech@demo.test'),
    viewer: await h.signIn('viewer@demo.test'),
  };
}

const speciesId = (name: string) => h.database.db.select().from(species).where(eq(species.commonName, name)).get()!.id;
const resinId = (name: string) => h.database.db.select().from(resins).where(eq(resins.name, name)).get()!.id;

/** A 2 species × 2 resins plan with 3 coupons per cell and 2 controls per species. */
function plan(overrides: Record<string, unknown> = {}) {
  const sp = [speciesId('Maple, red'), speciesId('Buckeye, yellow')];
  const rs = [resinId('Crystal Pane 90'), resinId('Ember Pane 90 (dyed)')];
  return {
    title: 'Test plan',
    question: 'Does the dyed blend change uptake?',
    controlsPerSpecies: 2,
    conditions: sp.flatMap((s) =>
      rs.map((r) => ({
        speciesId: s,
        resinId: r,
        processLabel: '4 h vacuum, overnight soak',
        vacuumMinutes: 240,
        soakMinutes: 720,
        cureTempC: 107,
        couponsWanted: 3,
      })),
    ),
    ...overrides,
  };
}

async function createTrial(body: Record<string, unknown> = plan()) {
  const res = await as.technician.post('/api/trials').send(body);
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.trial as {
    id: number;
    code: string;
    conditions: { id: number; progress: Record<string, number> }[];
    warnings: { code: string; message: string }[];
  };
}

describe('trial routes: who may do what', () => {
  beforeAll(setUp);
  afterAll(async () => {
    await h.close();
  });

  it('answers 401 on every trial route without a session', async () => {
    const anon = h.agent();
    const calls = [
      anon.get('/api/trials'),
      anon.post('/api/trials').send(plan()),
      anon.get('/api/trials/1'),
      anon.patch('/api/trials/1').send({ title: 'x' }),
      anon.post('/api/trials/1/coupons'),
      anon.get('/api/trials/1/labels'),
    ];
    for (const res of await Promise.all(calls)) {
      expect(res.status, `${where(res)}`).toBe(401);
    }
  });

  it('lets every role read trials, progress and labels', async () => {
    const id = h.database.db.select().from(trials).where(eq(trials.code, DEMO_TRIAL_CODE)).get()!.id;
    for (const [role, agent] of Object.entries(as)) {
      for (const url of ['/api/trials', `/api/trials/${id}`, `/api/trials/${id}/labels`]) {
        expect((await agent.get(url)).status, `${role} GET ${url}`).toBe(200);
      }
    }
  });

  it('refuses writes to viewers and allows them to technicians and above', async () => {
    const denied = [
      await as.viewer.post('/api/trials').send(plan()),
      await as.viewer.patch('/api/trials/1').send({ title: 'x' }),
      await as.viewer.post('/api/trials/1/coupons'),
    ];
    for (const res of denied) {
      expect(res.status, `${where(res)}`).toBe(403);
      expect(res.body.error.code).toBe('forbidden');
    }
    for (const role of ['technician', 'reviewer', 'admin'] as const) {
      const created = await as[role].post('/api/trials').send(plan({ title: `by ${role}` }));
      expect(created.status, role).toBe(201);
      const id = created.body.trial.id;
      expect((await as[role].patch(`/api/trials/${id}`).send({ notes: 'ok' })).status, role).toBe(200);
      expect((await as[role].post(`/api/trials/${id}/coupons`)).status, role).toBe(200);
    }
  });
});

describe('planning a trial', () => {
  beforeEach(setUp);
  afterEach(async () => {
    await h.close();
  });

  it('gives each trial a code from the year and a counter', async () => {
    const yy = String(new Date().getUTCFullYear() % 100).padStart(2, '0');
    const a = await createTrial();
    const b = await createTrial();
    expect(a.code).toMatch(new RegExp(`^T${yy}-\\d{3}$`));
    expect(Number(b.code.slice(4))).toBe(Number(a.code.slice(4)) + 1);
  });

  it('validates the plan, naming the field', async () => {
    const base = plan();
    const first = base.conditions[0]!;
    const cases: [Record<string, unknown>, number, string, RegExp][] = [
      [{ ...base, conditions: [] }, 400, 'conditions', /at least one condition/],
      [{ ...base, question: '' }, 400, 'question', /question/],
      [{ ...base, controlsPerSpecies: -1 }, 400, 'controlsPerSpecies', /negative/],
      [{ ...base, colour: 'red' }, 400, 'colour', /Unknown field/],
      [{ ...base, conditions: [{ ...first, couponsWanted: 0 }] }, 400, 'conditions.0.couponsWanted', /at least 1/],
      [{ ...base, conditions: [{ ...first, cureTempC: 250 }] }, 400, 'conditions.0.cureTempC', /°F/],
      [{ ...base, conditions: [{ ...first, soakMinutes: 12.5 }] }, 400, 'conditions.0.soakMinutes', /whole number/],
      [{ ...base, conditions: [{ ...first, processLabel: '' }] }, 400, 'conditions.0.processLabel', /process settings/],
      [{ ...base, conditions: [{ ...first, pressure: 3 }] }, 400, 'conditions.0.pressure', /Unknown field/],
      [{ ...base, conditions: [first, { ...first }] }, 400, 'conditions.1.processLabel', /Same species, resin and process as condition 1/],
      [{ ...base, conditions: [{ ...first, speciesId: 99999 }] }, 422, 'conditions.0.speciesId', /No species with id 99999/],
      [{ ...base, conditions: [{ ...first, resinId: 99999 }] }, 422, 'conditions.0.resinId', /No resin with id 99999/],
    ];
    for (const [body, status, field, message] of cases) {
      const res = await as.technician.post('/api/trials').send(body);
      expect(res.status, field).toBe(status);
      expect(res.body.error.fieldErrors?.[field]?.[0], `${field}: ${JSON.stringify(res.body.error)}`).toMatch(message);
    }
    expect(h.database.db.select().from(trials).all()).toHaveLength(2); // the demo's two, nothing half-written
  });

  it('warns, with plain reasons, about too few coupons, missing controls and a missing cell', async () => {
    const full = await createTrial();
    expect(full.warnings).toEqual([]);

    const base = plan();
    const weak = await createTrial({
      ...base,
      controlsPerSpecies: 0,
      conditions: [{ ...base.conditions[0]!, couponsWanted: 2 }, ...base.conditions.slice(1, 3)],
    });
    const codes = weak.warnings.map((w) => w.code).sort();
    expect(codes).toEqual(['few-coupons', 'missing-cell', 'no-controls', 'no-controls']);
    const few = weak.warnings.find((w) => w.code === 'few-coupons')!;
    expect(few.message).toMatch(/too few to see a difference from noise/);
    expect(few).toMatchObject({ conditionIndex: 0 });
    const missing = weak.warnings.find((w) => w.code === 'missing-cell')!;
    expect(missing).toMatchObject({ speciesId: speciesId('Buckeye, yellow'), resinId: resinId('Ember Pane 90 (dyed)') });
    expect(missing.message).toMatch(/Buckeye, yellow is never treated with Ember Pane 90/);
    expect(
      weak.warnings
        .filter((w) => w.code === 'no-controls')
        .map((w) => w.message)
        .join(' '),
    ).toMatch(/Maple, red has no untreated controls/);

    const hot = await createTrial({ ...base, conditions: [{ ...base.conditions[0]!, cureTempC: 130, soakMinutes: 60 }] });
    expect(hot.warnings.map((w) => w.code).sort()).toEqual(['cure-outside-window', 'short-soak']);
  });

  it('lists trials with filters and pagination', async () => {
    await createTrial(plan({ title: 'Needle in a haystack' }));
    const all = await as.viewer.get('/api/trials?pageSize=2&sort=code');
    expect(all.body).toMatchObject({ page: 1, pageSize: 2, total: 3 });
    expect(all.body.items[0]).toMatchObject({
      code: DEMO_TRIAL_CODE,
      conditionCount: 6,
      couponCount: 30,
      speciesCount: 3,
      resinCount: 2,
      plannedCount: 30,
      status: 'running',
    });
    expect(all.body.items[0].doneCount).toBeGreaterThan(0);
    const found = await as.viewer.get('/api/trials?q=haystack');
    expect(found.body.items.map((t: { title: string }) => t.title)).toEqual(['Needle in a haystack']);
    const running = await as.viewer.get('/api/trials?status=running');
    expect(running.body.items.map((t: { code: string }) => t.code)).toEqual([DEMO_TRIAL_CODE]);
    expect((await as.viewer.get('/api/trials?status=maybe')).body.error.fieldErrors.status).toBeTruthy();
    expect((await as.viewer.get('/api/trials?sort=colour')).body.error.fieldErrors.sort).toBeTruthy();
    expect((await as.viewer.get('/api/trials/99999')).status).toBe(404);
  });

  it('edits the grid in place: coupons stay on kept conditions, and a condition with coupons cannot be removed', async () => {
    const t = await createTrial();
    await as.technician.post(`/api/trials/${t.id}/coupons`);
    const base = plan();
    const grown = base.conditions.map((c, i) => (i === 0 ? { ...c, couponsWanted: 5 } : c));
    const patched = await as.technician.patch(`/api/trials/${t.id}`).send({ conditions: grown, title: 'Renamed' });
    expect(patched.status).toBe(200);
    expect(patched.body.trial.title).toBe('Renamed');
    expect(patched.body.trial.conditions.map((c: { id: number }) => c.id)).toEqual(t.conditions.map((c) => c.id));
    expect(patched.body.trial.conditions[0].progress).toMatchObject({ planned: 5, created: 3 });

    const shrunk = await as.technician.patch(`/api/trials/${t.id}`).send({ conditions: base.conditions.slice(1) });
    expect(shrunk.status).toBe(409);
    expect(shrunk.body.error.fieldErrors.conditions[0]).toMatch(/already has coupons|cannot be removed/);
    expect((await as.viewer.get(`/api/trials/${t.id}`)).body.trial.conditions).toHaveLength(4);

    const fresh = await createTrial();
    const removed = await as.technician.patch(`/api/trials/${fresh.id}`).send({ conditions: base.conditions.slice(1) });
    expect(removed.status).toBe(200);
    expect(removed.body.trial.conditions).toHaveLength(3);

    const audit = h.database.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'trial'), eq(auditLog.action, 'update')))
      .all();
    expect(audit.length).toBeGreaterThanOrEqual(2);
  });

  it('keeps a closed trial closed to plan changes, but lets it be reopened', async () => {
    const t = await createTrial();
    expect((await as.technician.patch(`/api/trials/${t.id}`).send({ status: 'closed' })).status).toBe(200);
    const refused = await as.technician.patch(`/api/trials/${t.id}`).send({ controlsPerSpecies: 3 });
    expect(refused.status).toBe(409);
    expect((await as.technician.post(`/api/trials/${t.id}/coupons`)).status).toBe(409);
    expect((await as.technician.patch(`/api/trials/${t.id}`).send({ status: 'planning' })).status).toBe(200);
    expect((await as.technician.patch(`/api/trials/${t.id}`).send({ status: 'paused' })).body.error.fieldErrors.status).toBeTruthy();
  });
});

describe('creating the planned coupons', () => {
  beforeEach(setUp);
  afterEach(async () => {
    await h.close();
  });

  it('creates treated coupons per condition and controls per species, with unique readable tags', async () => {
    const t = await createTrial();
    const res = await as.technician.post(`/api/trials/${t.id}/coupons`);
    expect(res.status).toBe(200);
    expect(res.body.created).toBe(4 * 3 + 2 * 2);
    const tags: string[] = res.body.coupons.map((c: { tag: string }) => c.tag);
    expect(new Set(tags).size).toBe(tags.length);
    const treated = res.body.coupons.filter((c: { role: string }) => c.role === 'treated');
    const controls = res.body.coupons.filter((c: { role: string }) => c.role === 'control');
    expect(treated).toHaveLength(12);
    expect(controls).toHaveLength(4);
    expect(controls.every((c: { conditionId: number | null }) => c.conditionId === null)).toBe(true);
    const esc = t.code.replace('-', '\\-');
    for (const c of treated) expect(c.tag).toMatch(new RegExp(`^${esc}-[A-Z0-9]{2,5}-[A-Z0-9]{2,6}-\\d{2}$`));
    for (const c of controls) expect(c.tag).toMatch(new RegExp(`^${esc}-[A-Z0-9]{2,5}-C\\d{2}$`));
    expect(tags).toContain(`${t.code}-RMA-CP90-01`);
    expect(tags).toContain(`${t.code}-RMA-CP90-03`);
    expect(tags).toContain(`${t.code}-YBU-EPD90-02`);
    expect(tags).toContain(`${t.code}-YBU-C02`);

    const all = h.database.db
      .select({ tag: coupons.tag })
      .from(coupons)
      .all()
      .map((r) => r.tag);
    expect(new Set(all).size).toBe(all.length);
  });

  it('is idempotent and creates only the missing coupons when the plan grows', async () => {
    const t = await createTrial();
    const first = await as.technician.post(`/api/trials/${t.id}/coupons`);
    const again = await as.technician.post(`/api/trials/${t.id}/coupons`);
    expect(again.body.created).toBe(0);
    expect(again.body.coupons).toHaveLength(first.body.coupons.length);

    const base = plan();
    const grown = base.conditions.map((c, i) => (i === 0 ? { ...c, couponsWanted: 5 } : c));
    await as.technician.patch(`/api/trials/${t.id}`).send({ conditions: grown, controlsPerSpecies: 3 });
    const more = await as.technician.post(`/api/trials/${t.id}/coupons`);
    expect(more.body.created).toBe(2 + 2);
    const newTags = more.body.coupons
      .slice(first.body.coupons.length)
      .map((c: { tag: string }) => c.tag)
      .sort();
    expect(newTags).toEqual([`${t.code}-RMA-C03`, `${t.code}-RMA-CP90-04`, `${t.code}-RMA-CP90-05`, `${t.code}-YBU-C03`].sort());
    expect(more.body.trial.totals).toMatchObject({ planned: 5 + 3 * 3 + 2 * 3, created: 5 + 3 * 3 + 2 * 3 });
  });

  it('keeps the codes already on tags when a species with a clashing code joins later', async () => {
    const base = plan();
    // A shop wood "Red maple" (a later id than the handbook's "Maple, red") codes to RMA as well.
    const wood = await as.admin.post('/api/species').send({
      commonName: 'Red maple',
      botanicalName: 'Acer rubrum',
      measuredDensityKgM3: 520,
      measuredMoisturePct: 6,
      source: 'shop',
      origin: 'shop-measured',
    });
    const shopId = wood.body.species.id as number;
    const handbookId = speciesId('Maple, red');
    expect(handbookId).toBeLessThan(shopId);
    const t = await createTrial({ ...base, conditions: [{ ...base.conditions[0]!, speciesId: shopId }] });
    const first = await as.technician.post(`/api/trials/${t.id}/coupons`);
    expect(first.body.coupons.map((c: { tag: string }) => c.tag)).toContain(`${t.code}-RMA-CP90-01`);

    // The handbook maple joins: by id it would win RMA, but the shop wood's tags are already printed.
    await as.technician.patch(`/api/trials/${t.id}`).send({
      conditions: [
        { ...base.conditions[0]!, speciesId: shopId },
        { ...base.conditions[0]!, speciesId: handbookId },
      ],
    });
    const res = await as.technician.post(`/api/trials/${t.id}/coupons`);
    expect(res.status).toBe(200);
    const bySpecies = (id: number) => res.body.coupons.filter((c: { speciesId: number }) => c.speciesId === id).map((c: { tag: string }) => c.tag);
    expect(bySpecies(shopId).every((tag: string) => tag.includes('-RMA-'))).toBe(true);
    expect(bySpecies(handbookId)).toEqual(expect.arrayContaining([`${t.code}-RMA2-CP90-01`, `${t.code}-RMA2-C01`]));
    expect(bySpecies(handbookId).every((tag: string) => tag.includes('-RMA2-'))).toBe(true);
  });

  it('writes all the coupons or none: a failure part-way leaves no coupons', async () => {
    const t = await createTrial();
    const { sqlite } = h.database;
    // Fail the fifth insert of this trial's coupons, inside the one transaction.
    sqlite.exec(`CREATE TRIGGER fail_fifth BEFORE INSERT ON coupons
      WHEN (SELECT count(*) FROM coupons WHERE trial_id = NEW.trial_id) >= 4
      BEGIN SELECT RAISE(ABORT, 'forced failure'); END;`);
    const failed = await as.technician.post(`/api/trials/${t.id}/coupons`);
    expect(failed.status).toBe(500);
    expect(h.database.db.select().from(coupons).where(eq(coupons.trialId, t.id)).all()).toHaveLength(0);
    expect(
      h.database.db
        .select()
        .from(auditLog)
        .where(and(eq(auditLog.entity, 'trial'), eq(auditLog.action, 'create-coupons'), eq(auditLog.entityId, String(t.id))))
        .all(),
    ).toHaveLength(0);

    sqlite.exec('DROP TRIGGER fail_fifth');
    const ok = await as.technician.post(`/api/trials/${t.id}/coupons`);
    expect(ok.body.created).toBe(16);
    const audit = h.database.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.action, 'create-coupons'), eq(auditLog.entityId, String(t.id))))
      .all();
    expect(audit).toHaveLength(1);
    expect(audit[0]!.after).toMatchObject({ created: 16 });
  });

  it('answers 404 for an unknown trial', async () => {
    expect((await as.technician.post('/api/trials/99999/coupons')).status).toBe(404);
    expect((await as.viewer.get('/api/trials/99999/labels')).status).toBe(404);
  });
});

describe('progress and labels', () => {
  beforeEach(setUp);
  afterEach(async () => {
    await h.close();
  });

  it('counts coupons planned, created, dry-weighed and cured-weighed, ignoring superseded and deleted weighings', async () => {
    const t = await createTrial();
    const made = (await as.technician.post(`/api/trials/${t.id}/coupons`)).body;
    const cond = t.conditions[0]!.id;
    const inCell = made.coupons.filter((c: { conditionId: number | null }) => c.conditionId === cond).map((c: { id: number }) => c.id);
    const control = made.coupons.find((c: { role: string }) => c.role === 'control');
    const db = h.database.db;
    const at = new Date().toISOString();
    const w = (values: Omit<typeof weighings.$inferInsert, 'measuredAt'>) =>
      db
        .insert(weighings)
        .values({ ...values, measuredAt: at })
        .returning()
        .get();
    // Coupon 0: a reading corrected by a later one (counts once), and a cured reading.
    const corrected = w({ couponId: inCell[0], stage: 'dry', massG: 10.4 });
    w({ couponId: inCell[0], stage: 'dry', massG: 10, supersededBy: corrected.id });
    w({ couponId: inCell[0], stage: 'cured', massG: 15 });
    // Coupon 1: its only current dry reading was deleted, and the one it superseded does not count either.
    const deleted = w({ couponId: inCell[1], stage: 'dry', massG: 11.2, deletedAt: at });
    w({ couponId: inCell[1], stage: 'dry', massG: 11, supersededBy: deleted.id });
    // Coupon 2: a drying check is not a dry weighing.
    w({ couponId: inCell[2], stage: 'drying-check', massG: 11 });
    db.insert(weighings).values({ couponId: control.id, stage: 'dry', massG: 9, measuredAt: at }).run();

    const res = await as.viewer.get(`/api/trials/${t.id}`);
    expect(res.status).toBe(200);
    const trial = res.body.trial;
    expect(trial.conditions[0].progress).toEqual({ planned: 3, created: 3, dryWeighed: 1, curedWeighed: 1 });
    expect(trial.conditions[1].progress).toEqual({ planned: 3, created: 3, dryWeighed: 0, curedWeighed: 0 });
    const controlRow = trial.controls.find((c: { speciesId: number }) => c.speciesId === control.speciesId);
    expect(controlRow.progress).toEqual({ planned: 2, created: 2, dryWeighed: 1, curedWeighed: 0 });
    expect(trial.totals).toEqual({ planned: 16, created: 16, dryWeighed: 2, curedWeighed: 1 });
    expect(trial.conditions[0].label).toBe('Maple, red · Crystal Pane 90 · 4 h vacuum, overnight soak');
  });

  it('answers a label sheet with one QR code per coupon, opening the coupon page', async () => {
    const t = await createTrial();
    const made = (await as.technician.post(`/api/trials/${t.id}/coupons`)).body;
    const res = await as.viewer.get(`/api/trials/${t.id}/labels`);
    expect(res.status).toBe(200);
    expect(res.body.trial).toMatchObject({ id: t.id, code: t.code });
    expect(res.body.labels).toHaveLength(made.coupons.length);
    const svgCount = res.body.labels.map((l: { qrSvg: string }) => (l.qrSvg.match(/<svg/g) ?? []).length);
    expect(svgCount.every((n: number) => n === 1)).toBe(true);
    const first = res.body.labels[0];
    expect(first.url).toBe(`${h.config.appUrl}/coupons/${first.couponId}`);
    expect(first).toMatchObject({ role: 'treated', speciesName: 'Maple, red', conditionLabel: 'Maple, red · Crystal Pane 90 · 4 h vacuum, overnight soak' });
    const control = res.body.labels.find((l: { role: string }) => l.role === 'control');
    expect(control.conditionLabel).toMatch(/untreated control/);
    expect(new Set(res.body.labels.map((l: { tag: string }) => l.tag)).size).toBe(made.coupons.length);

    const empty = await createTrial();
    expect((await as.viewer.get(`/api/trials/${empty.id}/labels`)).body.labels).toEqual([]);
  });
});

describe('demo trials', () => {
  beforeAll(setUp);
  afterAll(async () => {
    await h.close();
  });

  it(`seeds ${DEMO_TRIAL_CODE} with its coupons and ${DEMO_PLANNING_TRIAL_CODE} with planning warnings`, async () => {
    const found = demoTrialCoupons(h.database.db);
    expect(found).toHaveLength(3 * 2 * 4 + 3 * 2);
    expect(found.every((c) => c.tag.startsWith(`${DEMO_TRIAL_CODE}-`))).toBe(true);
    expect(found.filter((c) => c.role === 'treated').every((c) => c.resinId !== null)).toBe(true);

    const list = await as.viewer.get('/api/trials?sort=code');
    const [main, planning] = list.body.items;
    expect(main.code).toBe(DEMO_TRIAL_CODE);
    const detail = (await as.viewer.get(`/api/trials/${main.id}`)).body.trial;
    expect(detail.warnings).toEqual([]);
    expect(detail.totals).toMatchObject({ planned: 30, created: 30 });
    expect(planning.code).toBe(DEMO_PLANNING_TRIAL_CODE);
    const weak = (await as.viewer.get(`/api/trials/${planning.id}`)).body.trial;
    expect(weak.warnings.map((w: { code: string }) => w.code).sort()).toEqual(['few-coupons', 'no-controls']);
    expect(weak.couponCount).toBe(0);
  });
});
