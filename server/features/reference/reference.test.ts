import { readFileSync } from 'node:fs';
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { startHarness, type Harness } from '../../testing/harness';
import { auditLog } from '../../db/schema/admin';
import { coupons } from '../../db/schema/coupons';
import { resinLots, resins, species } from '../../db/schema/reference';
import { runs } from '../../db/schema/runs';
import { seedReference } from '../../seed';
import { HANDBOOK_SPECIES, type ReferenceFile } from './handbook-species';

type Agent = Awaited<ReturnType<Harness['signIn']>>;
/** "METHOD /path" of the request behind a supertest answer, for assertion messages. */
const where = (res: { status: number }) => {
  const r = (res as unknown as { req: { method: string; path: string } }).req;
  return `${r.method} ${r.path}`;
};
const DAY_MS = 24 * 3600 * 1000;
const daysAgo = (n: number) => new Date(Date.now() - n * DAY_MS).toISOString().slice(0, 10);

let h: Harness;
let as: Record<'admin' | 'reviewer' | 'technician' | 'viewer', Agent>;

async function signInAll(harness: Harness) {
  return {
    admin: await harness.signIn('admin@demo.test'),
    reviewer: await harness.signIn('reviewer@demo.test'),
    technician: await harness.signIn('tech@demo.test'),
    viewer: await harness.signIn('viewer@demo.test'),
  };
}

const newSpecies = (name: string) => ({
  commonName: name,
  botanicalName: 'Acer spp.',
  measuredDensityKgM3: 480,
  measuredMoisturePct: 7,
  source: 'Measured in the shop by caliper and balance',
  origin: 'shop-measured',
});
const newResin = (name: string) => ({
  name,
  kind: 'Test monomer blend',
  liquidDensityGcm3: 1.04,
  curedDensityGcm3: 1.16,
  cureMinC: 90,
  cureMaxC: 120,
  shelfLifeDays: 300,
});

function resinIdByName(name: string): number {
  return h.database.db.select().from(resins).where(eq(resins.name, name)).get()!.id;
}

describe('reference routes: who may do what', () => {
  beforeAll(async () => {
    h = await startHarness();
    as = await signInAll(h);
  });
  afterAll(async () => {
    await h.close();
  });

  it('answers 401 on every reference route without a session', async () => {
    const anon = h.agent();
    const calls = [
      anon.get('/api/species'),
      anon.get('/api/species/1'),
      anon.post('/api/species').send(newSpecies('Anon wood')),
      anon.patch('/api/species/1').send({ notes: 'x' }),
      anon.get('/api/resins'),
      anon.get('/api/resins/1'),
      anon.post('/api/resins').send(newResin('Anon resin')),
      anon.patch('/api/resins/1').send({ notes: 'x' }),
      anon.get('/api/resin-lots'),
      anon.get('/api/resin-lots/1'),
      anon.post('/api/resin-lots').send({}),
      anon.patch('/api/resin-lots/1').send({ reuseCount: 1 }),
    ];
    for (const res of await Promise.all(calls)) {
      expect(res.status, `${where(res)}`).toBe(401);
      expect(res.body.error.code).toBe('unauthenticated');
    }
  });

  it('lets every role read species, resins and lots', async () => {
    const speciesId = h.database.db.select().from(species).get()!.id;
    const resinId = h.database.db.select().from(resins).get()!.id;
    const lotId = h.database.db.select().from(resinLots).get()!.id;
    for (const [role, agent] of Object.entries(as)) {
      for (const url of ['/api/species', `/api/species/${speciesId}`, '/api/resins', `/api/resins/${resinId}`, '/api/resin-lots', `/api/resin-lots/${lotId}`]) {
        const res = await agent.get(url);
        expect(res.status, `${role} GET ${url}`).toBe(200);
      }
    }
  });

  it('lets only the admin create and edit species and resins', async () => {
    const speciesId = h.database.db.select().from(species).get()!.id;
    const resinId = h.database.db.select().from(resins).get()!.id;
    for (const role of ['viewer', 'technician', 'reviewer'] as const) {
      const a = as[role];
      const denied = [
        await a.post('/api/species').send(newSpecies(`${role} wood`)),
        await a.patch(`/api/species/${speciesId}`).send({ notes: 'changed' }),
        await a.post('/api/resins').send(newResin(`${role} resin`)),
        await a.patch(`/api/resins/${resinId}`).send({ notes: 'changed' }),
      ];
      for (const res of denied) {
        expect(res.status, `${role} ${where(res)}`).toBe(403);
        expect(res.body.error.code).toBe('forbidden');
      }
    }
    expect((await as.admin.post('/api/species').send(newSpecies('Admin wood'))).status).toBe(201);
    expect((await as.admin.patch(`/api/species/${speciesId}`).send({ notes: 'changed by the admin' })).status).toBe(200);
    expect((await as.admin.post('/api/resins').send(newResin('Admin resin'))).status).toBe(201);
    expect((await as.admin.patch(`/api/resins/${resinId}`).send({ notes: 'changed by the admin' })).status).toBe(200);
  });

  it('lets technicians and above create and edit lots, and refuses viewers', async () => {
    const resinId = h.database.db.select().from(resins).get()!.id;
    const lot = (code: string) => ({ resinId, code, activatedAt: daysAgo(5), volumeMl: 1000 });
    const denied = await as.viewer.post('/api/resin-lots').send(lot('V-1'));
    expect(denied.status).toBe(403);
    let n = 0;
    for (const role of ['technician', 'reviewer', 'admin'] as const) {
      const created = await as[role].post('/api/resin-lots').send(lot(`ROLE-${++n}`));
      expect(created.status, role).toBe(201);
      const id = created.body.lot.id as number;
      expect((await as.viewer.patch(`/api/resin-lots/${id}`).send({ reuseCount: 1 })).status).toBe(403);
      expect((await as[role].patch(`/api/resin-lots/${id}`).send({ reuseCount: 1 })).status, role).toBe(200);
    }
  });
});

describe('species', () => {
  beforeEach(async () => {
    h = await startHarness();
    as = await signInAll(h);
  });
  afterEach(async () => {
    await h.close();
  });

  it('searches by name (common or botanical) and filters by origin, paginated', async () => {
    const maples = await as.viewer.get('/api/species?q=maple&pageSize=200');
    expect(maples.status).toBe(200);
    const names = maples.body.items.map((s: { commonName: string }) => s.commonName);
    expect(names).toEqual(expect.arrayContaining(['Maple, sugar', 'Maple, red', 'Maple, silver', 'Maple, bigleaf']));
    expect(names.every((n: string) => /maple/i.test(n))).toBe(true);

    const acer = await as.viewer.get('/api/species?q=Acer&origin=handbook&pageSize=200');
    expect(acer.body.items.map((s: { commonName: string }) => s.commonName).sort()).toEqual(
      ['Box elder', 'Maple, bigleaf', 'Maple, red', 'Maple, silver', 'Maple, sugar'].sort(),
    );

    const shop = await as.viewer.get('/api/species?origin=shop-measured');
    expect(shop.body.total).toBeGreaterThan(0);
    expect(shop.body.items.every((s: { origin: string }) => s.origin === 'shop-measured')).toBe(true);

    const page = await as.viewer.get('/api/species?page=2&pageSize=5&sort=-sg12');
    expect(page.body).toMatchObject({ page: 2, pageSize: 5 });
    expect(page.body.items).toHaveLength(5);
    const sg = page.body.items.map((s: { sg12: number | null }) => s.sg12 ?? 0);
    expect([...sg].sort((a, b) => b - a)).toEqual(sg);

    const wildcard = await as.viewer.get(`/api/species?q=${encodeURIComponent('%')}`);
    expect(wildcard.body.total).toBe(0);
  });

  it('names the parameter of a bad query', async () => {
    const badSort = await as.viewer.get('/api/species?sort=colour');
    expect(badSort.status).toBe(400);
    expect(badSort.body.error.fieldErrors.sort[0]).toMatch(/commonName/);
    const badOrigin = await as.viewer.get('/api/species?origin=forest');
    expect(badOrigin.body.error.fieldErrors.origin).toBeTruthy();
    const unknown = await as.viewer.get('/api/species?colour=red');
    expect(unknown.body.error.fieldErrors.colour).toEqual(['Unknown field']);
  });

  it('creates a shop-measured species and refuses incoherent or unknown fields, naming them', async () => {
    const ok = await as.admin.post('/api/species').send(newSpecies('Maple burl, quilted'));
    expect(ok.status).toBe(201);
    expect(ok.body.species).toMatchObject({ commonName: 'Maple burl, quilted', origin: 'shop-measured', measuredDensityKgM3: 480 });

    const cases: [Record<string, unknown>, string, RegExp][] = [
      [{ ...newSpecies('A'), source: undefined }, 'source', /./],
      [{ ...newSpecies('B'), colour: 'red' }, 'colour', /Unknown field/],
      [{ ...newSpecies('C'), measuredDensityKgM3: undefined }, 'measuredDensityKgM3', /measured density/],
      [{ ...newSpecies('D'), measuredMoisturePct: undefined }, 'measuredMoisturePct', /moisture content/],
      [{ ...newSpecies('E'), origin: 'handbook', basicSg: 0.5, sg12: 0.45 }, 'sg12', /cannot be below the basic SG/],
      [{ ...newSpecies('F'), origin: 'handbook' }, 'basicSg', /basic SG or the SG at 12/],
      [{ ...newSpecies('G'), basicSg: 3 }, 'basicSg', /not a wood/],
      [{ ...newSpecies('H'), sideHardnessN: -5 }, 'sideHardnessN', /not plausible/],
      [{ ...newSpecies('I'), commonName: 'x'.repeat(121) }, 'commonName', /at most 120/],
    ];
    for (const [body, field, message] of cases) {
      const res = await as.admin.post('/api/species').send(body);
      expect(res.status, field).toBe(400);
      expect(res.body.error.code).toBe('validation_failed');
      expect(res.body.error.fieldErrors[field]?.[0], field).toMatch(message);
    }

    const dup = await as.admin.post('/api/species').send(newSpecies('maple, SUGAR'));
    expect(dup.status).toBe(409);
    expect(dup.body.error.fieldErrors.commonName).toBeTruthy();
  });

  it('edits a species, checks the merged row and audits the change', async () => {
    const created = (await as.admin.post('/api/species').send(newSpecies('Ash burl'))).body.species;
    const patched = await as.admin.patch(`/api/species/${created.id}`).send({ measuredDensityKgM3: 510, notes: 'remeasured' });
    expect(patched.status).toBe(200);
    expect(patched.body.species).toMatchObject({ measuredDensityKgM3: 510, notes: 'remeasured' });

    const incoherent = await as.admin.patch(`/api/species/${created.id}`).send({ measuredDensityKgM3: null });
    expect(incoherent.status).toBe(400);
    expect(incoherent.body.error.fieldErrors.measuredDensityKgM3).toBeTruthy();

    expect((await as.admin.patch(`/api/species/${created.id}`).send({})).status).toBe(400);
    expect((await as.admin.patch(`/api/species/${created.id}`).send({ origin: 'guess' })).body.error.fieldErrors.origin).toBeTruthy();
    expect((await as.admin.patch('/api/species/999999').send({ notes: 'x' })).status).toBe(404);
    expect((await as.admin.patch(`/api/species/${created.id}`).send({ commonName: 'Maple, red' })).status).toBe(409);

    const audit = h.database.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'species'), eq(auditLog.entityId, String(created.id)), eq(auditLog.action, 'update')))
      .all();
    expect(audit).toHaveLength(1);
    expect(audit[0]!.before).toMatchObject({ measuredDensityKgM3: 480, notes: null });
    expect(audit[0]!.after).toMatchObject({ measuredDensityKgM3: 510, notes: 'remeasured' });
  });
});

describe('resins', () => {
  beforeEach(async () => {
    h = await startHarness();
    as = await signInAll(h);
  });
  afterEach(async () => {
    await h.close();
  });

  it('validates the cure window and densities, naming the field', async () => {
    const cases: [Record<string, unknown>, string, RegExp][] = [
      [{ ...newResin('A'), cureMinC: 120, cureMaxC: 100 }, 'cureMaxC', /must be above the lowest/],
      [{ ...newResin('B'), cureMinC: 110, cureMaxC: 110 }, 'cureMaxC', /must be above the lowest/],
      [{ ...newResin('C'), cureMaxC: 250 }, 'cureMaxC', /°F/],
      [{ ...newResin('D'), cureMinC: 20 }, 'cureMinC', /not a heat cure/],
      [{ ...newResin('E'), liquidDensityGcm3: 3 }, 'liquidDensityGcm3', /not plausible/],
      [{ ...newResin('F'), curedDensityGcm3: 0.2 }, 'curedDensityGcm3', /not plausible/],
      [{ ...newResin('G'), shelfLifeDays: 12.5 }, 'shelfLifeDays', /whole number/],
      [{ ...newResin('H'), name: '' }, 'name', /Enter the name/],
      [{ ...newResin('I'), vendor: 'x' }, 'vendor', /Unknown field/],
    ];
    for (const [body, field, message] of cases) {
      const res = await as.admin.post('/api/resins').send(body);
      expect(res.status, field).toBe(400);
      expect(res.body.error.fieldErrors[field]?.[0], field).toMatch(message);
    }
    const dup = await as.admin.post('/api/resins').send(newResin('crystal pane 90'));
    expect(dup.status).toBe(409);
  });

  it('defaults the cure window to 200–250 °F in °C without rounding, and the shelf life to the shop setting when the resin has none', async () => {
    expect((await as.admin.patch('/api/settings').send({ lotShelfLifeDays: 180 })).status).toBe(200);
    const { shelfLifeDays: _omit, cureMinC: _a, cureMaxC: _b, ...bare } = newResin('Bare blend');
    const res = await as.admin.post('/api/resins').send(bare);
    expect(res.status).toBe(201);
    expect(res.body.resin).toMatchObject({ cureMinC: ((200 - 32) * 5) / 9, cureMaxC: ((250 - 32) * 5) / 9, shelfLifeDays: 180, usableLots: 0 });
  });

  it('checks the merged cure window on edit and audits the change', async () => {
    const created = (await as.admin.post('/api/resins').send(newResin('Edit blend'))).body.resin;
    const bad = await as.admin.patch(`/api/resins/${created.id}`).send({ cureMinC: 125 });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fieldErrors.cureMaxC).toBeTruthy();
    const ok = await as.admin.patch(`/api/resins/${created.id}`).send({ cureMinC: 95, cureMaxC: 115 });
    expect(ok.body.resin).toMatchObject({ cureMinC: 95, cureMaxC: 115 });
    const audit = h.database.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'resin'), eq(auditLog.action, 'update')))
      .all();
    expect(audit.at(-1)?.after).toEqual({ cureMinC: 95, cureMaxC: 115 });
  });

  it('lists resins with a search and counts the usable lots of each', async () => {
    const list = await as.viewer.get('/api/resins?q=pane&sort=name');
    expect(list.status).toBe(200);
    expect(list.body.items.length).toBeGreaterThan(0);
    const clear = list.body.items.find((r: { name: string }) => r.name === 'Crystal Pane 90');
    // Demo: two active clear lots in date (one close to expiry), one spent.
    expect(clear.usableLots).toBe(2);
  });
});

describe('resin lots', () => {
  beforeEach(async () => {
    h = await startHarness();
    as = await signInAll(h);
  });
  afterEach(async () => {
    await h.close();
  });

  async function makeResin(shelfLifeDays: number) {
    const res = await as.admin.post('/api/resins').send({ ...newResin(`Shelf ${shelfLifeDays}`), shelfLifeDays });
    return res.body.resin.id as number;
  }

  it('computes age, expiry date, expired and expiring soon from the resin shelf life', async () => {
    const resinId = await makeResin(365);
    const make = async (code: string, days: number) =>
      (await as.technician.post('/api/resin-lots').send({ resinId, code, activatedAt: daysAgo(days), volumeMl: 500 })).body.lot;
    const fresh = await make('FRESH', 10);
    const soon = await make('SOON', 350);
    const edge = await make('EDGE', 365);
    const old = await make('OLD', 400);
    expect(fresh).toMatchObject({ ageDays: 10, shelfLifeDays: 365, expired: false, expiringSoon: false });
    expect(soon).toMatchObject({ ageDays: 350, expired: false, expiringSoon: true });
    expect(edge).toMatchObject({ ageDays: 365, expired: false, expiringSoon: true });
    expect(old).toMatchObject({ ageDays: 400, expired: true, expiringSoon: false });
    const expected = new Date(Date.parse(daysAgo(10)) + 365 * DAY_MS).toISOString().slice(0, 10);
    expect(fresh.expiresOn).toBe(expected);

    // Twenty days on (the app's clock), the lot that was near expiry is past it.
    h.clock.offsetMs = 20 * DAY_MS;
    const later = await as.viewer.get(`/api/resin-lots/${soon.id}`);
    expect(later.body.lot).toMatchObject({ ageDays: 370, expired: true, expiringSoon: false });
  });

  it('applies a short resin shelf life, and an edited one, to the lot', async () => {
    const resinId = await makeResin(90);
    const lot = (await as.technician.post('/api/resin-lots').send({ resinId, code: 'SHORT', activatedAt: daysAgo(100), volumeMl: 500 })).body.lot;
    expect(lot).toMatchObject({ shelfLifeDays: 90, expired: true });
    await as.admin.patch(`/api/resins/${resinId}`).send({ shelfLifeDays: 365 });
    expect((await as.viewer.get(`/api/resin-lots/${lot.id}`)).body.lot).toMatchObject({ shelfLifeDays: 365, expired: false });
  });

  it('filters and sorts the lot list; the demo has one lot near expiry and one spent', async () => {
    const all = await as.viewer.get('/api/resin-lots?sort=-activatedAt');
    expect(all.status).toBe(200);
    expect(all.body.total).toBe(4);
    expect(all.body.items.filter((l: { status: string }) => l.status === 'spent')).toHaveLength(1);
    expect(all.body.items.filter((l: { expiringSoon: boolean; status: string }) => l.expiringSoon && l.status === 'active')).toHaveLength(1);
    const dates = all.body.items.map((l: { activatedAt: string }) => l.activatedAt);
    expect([...dates].sort().reverse()).toEqual(dates);

    const spent = await as.viewer.get('/api/resin-lots?status=spent');
    expect(spent.body.items.map((l: { status: string }) => l.status)).toEqual(['spent']);
    const byResin = await as.viewer.get(`/api/resin-lots?resinId=${resinIdByName('Ember Pane 90 (dyed)')}`);
    expect(byResin.body.items.every((l: { resinName: string }) => l.resinName === 'Ember Pane 90 (dyed)')).toBe(true);
    expect((await as.viewer.get('/api/resin-lots?status=gone')).body.error.fieldErrors.status).toBeTruthy();
  });

  it('validates a new lot, naming the field', async () => {
    const resinId = resinIdByName('Crystal Pane 90');
    const base = { resinId, code: 'NEW-1', activatedAt: daysAgo(1), volumeMl: 1000 };
    const cases: [Record<string, unknown>, number, string, RegExp][] = [
      [{ ...base, resinId: 99999 }, 422, 'resinId', /No resin with id 99999/],
      [{ ...base, activatedAt: new Date(Date.now() + 5 * DAY_MS).toISOString() }, 422, 'activatedAt', /future/],
      [{ ...base, activatedAt: 'last tuesday' }, 400, 'activatedAt', /YYYY-MM-DD/],
      [{ ...base, volumeMl: -5 }, 400, 'volumeMl', /above zero/],
      [{ ...base, reuseCount: -1 }, 400, 'reuseCount', /negative/],
      [{ ...base, status: 'open' }, 400, 'status', /active, retired, spent/],
      [{ ...base, code: '' }, 400, 'code', /Enter the lot code/],
      [{ ...base, colour: 'amber' }, 400, 'colour', /Unknown field/],
    ];
    for (const [body, status, field, message] of cases) {
      const res = await as.technician.post('/api/resin-lots').send(body);
      expect(res.status, field).toBe(status);
      expect(res.body.error.fieldErrors[field]?.[0], field).toMatch(message);
    }
    expect((await as.technician.post('/api/resin-lots').send(base)).status).toBe(201);
    const dup = await as.technician.post('/api/resin-lots').send(base);
    expect(dup.status).toBe(409);
    expect(dup.body.error.fieldErrors.code).toBeTruthy();
  });

  it('audits a change of reuse count or status, with the reason', async () => {
    const resinId = resinIdByName('Crystal Pane 90');
    const lot = (await as.technician.post('/api/resin-lots').send({ resinId, code: 'AUD-1', activatedAt: daysAgo(3), volumeMl: 2000 })).body.lot;
    const reuse = await as.technician.patch(`/api/resin-lots/${lot.id}`).send({ reuseCount: 1, reason: 'drained back after a run' });
    expect(reuse.status).toBe(200);
    expect(reuse.body.lot.reuseCount).toBe(1);
    const spent = await as.technician.patch(`/api/resin-lots/${lot.id}`).send({ status: 'spent' });
    expect(spent.body.lot.status).toBe('spent');

    const rows = h.database.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'resin_lot'), eq(auditLog.entityId, String(lot.id)), eq(auditLog.action, 'update')))
      .all();
    expect(rows).toHaveLength(2);
    expect(rows[0]).toMatchObject({ before: { reuseCount: 0 }, after: { reuseCount: 1 }, reason: 'drained back after a run' });
    expect(rows[1]).toMatchObject({ before: { status: 'active' }, after: { status: 'spent' }, reason: null });
    expect(rows[0]!.actorId).toBeTruthy();

    expect((await as.technician.patch(`/api/resin-lots/${lot.id}`).send({ reason: 'only a reason' })).status).toBe(400);
    expect((await as.technician.patch(`/api/resin-lots/${lot.id}`).send({ resinId: 1 })).body.error.fieldErrors.resinId).toEqual(['Unknown field']);
    expect((await as.technician.patch('/api/resin-lots/99999').send({ reuseCount: 2 })).status).toBe(404);
  });

  it('refuses a reuse counted on a stale view, so two people bumping one lot lose no count', async () => {
    const resinId = resinIdByName('Crystal Pane 90');
    const lot = (await as.technician.post('/api/resin-lots').send({ resinId, code: 'RACE-1', activatedAt: daysAgo(3), volumeMl: 2000 })).body.lot;
    const first = await as.technician.patch(`/api/resin-lots/${lot.id}`).send({ reuseCount: 1, expectedReuseCount: 0 });
    expect(first.status).toBe(200);
    const stale = await as.admin.patch(`/api/resin-lots/${lot.id}`).send({ reuseCount: 1, expectedReuseCount: 0 });
    expect(stale.status).toBe(409);
    expect(stale.body.error.fieldErrors.reuseCount[0]).toMatch(/now shows 1 reuses/);
    expect((await as.admin.patch(`/api/resin-lots/${lot.id}`).send({ reuseCount: 2, expectedReuseCount: 1 })).body.lot.reuseCount).toBe(2);
  });

  it('lists the species that went through a lot, from the coupons of the runs that used it', async () => {
    const db = h.database.db;
    // Fresh lots, so that demo runs seeded on the demo lots do not change the answer.
    const make = async (code: string) =>
      (await as.technician.post('/api/resin-lots').send({ resinId: resinIdByName('Crystal Pane 90'), code, activatedAt: daysAgo(2), volumeMl: 900 })).body
        .lot as {
        id: number;
      };
    const lot = await make('THRU-1');
    const unused = await make('THRU-2');
    const walnut = db.select().from(species).where(eq(species.commonName, 'Walnut, black')).get()!;
    const maple = db.select().from(species).where(eq(species.commonName, 'Maple, sugar')).get()!;
    const run = db.insert(runs).values({ code: 'TEST-RUN-1', chamber: 'A', resinLotId: lot.id, altitudeM: 0 }).returning().get();
    const otherRun = db.insert(runs).values({ code: 'TEST-RUN-2', chamber: 'A', resinLotId: null, altitudeM: 0 }).returning().get();
    db.insert(coupons)
      .values([
        { tag: 'LOT-TEST-1', speciesId: walnut.id, role: 'treated', runId: run.id },
        { tag: 'LOT-TEST-2', speciesId: walnut.id, role: 'treated', runId: run.id },
        { tag: 'LOT-TEST-3', speciesId: maple.id, role: 'treated', runId: run.id },
        { tag: 'LOT-TEST-4', speciesId: maple.id, role: 'treated', runId: otherRun.id },
      ])
      .run();
    const one = await as.viewer.get(`/api/resin-lots/${lot.id}`);
    expect(one.body.lot.speciesThroughLot).toEqual(['Maple, sugar', 'Walnut, black']);
    const list = await as.viewer.get('/api/resin-lots?pageSize=200');
    const inList = list.body.items.find((l: { id: number }) => l.id === lot.id);
    expect(inList.speciesThroughLot).toEqual(['Maple, sugar', 'Walnut, black']);
    const other = list.body.items.find((l: { id: number }) => l.id === unused.id);
    expect(other.speciesThroughLot).toEqual([]);
  });
});

// ------------------------------------------------------------ the handbook seed against the published tables

/** Minimal CSV reader for the copied reference files (double-quoted fields, `#` comment lines). */
function readCsv(file: ReferenceFile): Record<string, string>[] {
  const text = readFileSync(new URL(`../../../tests/reference/${file}`, import.meta.url), 'utf8');
  const split = (line: string) => {
    const out: string[] = [];
    let cur = '';
    let quoted = false;
    for (let i = 0; i < line.length; i++) {
      const c = line[i]!;
      if (quoted && c === '"' && line[i + 1] === '"') {
        cur += '"';
        i++;
      } else if (c === '"') quoted = !quoted;
      else if (c === ',' && !quoted) {
        out.push(cur);
        cur = '';
      } else cur += c;
    }
    out.push(cur);
    return out;
  };
  const [header, ...rows] = text.split(/\r?\n/).filter((l) => l.trim() && !l.startsWith('#'));
  const names = split(header!);
  return rows.map((r) => Object.fromEntries(split(r).map((v, i) => [names[i]!, v])));
}

const LBF_TO_N = 4.448222; // NIST SP 811
const SG_TOLERANCE = 0.01;
const HARDNESS_TOLERANCE_N = 45;

describe('handbook species seed', () => {
  const handbook = readCsv('wood-handbook-species-sg-hardness.csv');
  const fia = readCsv('fia-ref-species-sg-subset.csv');

  it('holds at least 20 of the woods the trade stabilizes most, each with a citation', () => {
    expect(HANDBOOK_SPECIES.length).toBeGreaterThanOrEqual(20);
    const names = HANDBOOK_SPECIES.map((r) => r.commonName);
    for (const wanted of [
      'Maple, sugar',
      'Maple, red',
      'Maple, silver',
      'Maple, bigleaf',
      'Box elder',
      'Buckeye, yellow',
      'Walnut, black',
      'Cherry, black',
      'Ash, white',
      'Birch, yellow',
      'Birch, paper',
      'Oak, northern red',
      'Oak, white',
      'Yellow-poplar',
      'Alder, red',
      'Basswood, American',
      'Aspen, quaking',
      'Pine, eastern white',
      'Pine, ponderosa',
      'Redwood, old-growth',
      'Redwood, second-growth',
      'Sweetgum',
      'Hackberry',
      'Cottonwood, eastern',
    ]) {
      expect(names, wanted).toContain(wanted);
    }
    expect(new Set(names).size).toBe(names.length);
    for (const r of HANDBOOK_SPECIES) {
      expect(r.source, r.commonName).toMatch(/USDA FPL-GTR-190|USDA FS FIA REF_SPECIES/);
      if (r.checkedIn.sg === null || r.checkedIn.hardness === null) expect(`${r.source} ${r.notes}`, r.commonName).toMatch(/memory/);
      if (r.checkedIn.sg === null) expect(r.source, r.commonName).toMatch(/from memory/);
      expect(r.sg12, r.commonName).toBeGreaterThanOrEqual(r.basicSg);
    }
  });

  it.each(HANDBOOK_SPECIES.filter((r) => r.checkedIn.sg === 'wood-handbook-species-sg-hardness.csv').map((r) => [r.commonName, r] as const))(
    '%s matches tests/reference/wood-handbook-species-sg-hardness.csv (SG ±0.01, hardness ±45 N)',
    (_name, row) => {
      const ref = handbook.find((x) => x.common_name === row.commonName);
      expect(ref, `no row "${row.commonName}" in the handbook file`).toBeDefined();
      expect(ref!.botanical_name).toBe(row.botanicalName);
      expect(Math.abs(row.basicSg - Number(ref!.sg_green))).toBeLessThanOrEqual(SG_TOLERANCE);
      expect(Math.abs(row.sg12 - Number(ref!.sg_12pct))).toBeLessThanOrEqual(SG_TOLERANCE);
      const refN = ref!.side_hardness_12pct_N ? Number(ref!.side_hardness_12pct_N) : Number(ref!.side_hardness_12pct_lbf) * LBF_TO_N;
      expect(row.sideHardnessN).not.toBeNull();
      expect(Math.abs(row.sideHardnessN! - refN)).toBeLessThanOrEqual(HARDNESS_TOLERANCE_N);
      if (!ref!.side_hardness_12pct_N) expect(row.notes).toMatch(new RegExp(`converted from ${ref!.side_hardness_12pct_lbf} lbf`));
      if ((ref!.provenance_hardness ?? '').startsWith('M')) expect(row.notes).toMatch(/memory/);
    },
  );

  it.each(HANDBOOK_SPECIES.filter((r) => r.checkedIn.sg === 'fia-ref-species-sg-subset.csv').map((r) => [r.commonName, r] as const))(
    '%s matches tests/reference/fia-ref-species-sg-subset.csv (SG ±0.01)',
    (_name, row) => {
      const [genus, epithet] = row.botanicalName.split(' ');
      const ref = fia.find((x) => x.GENUS === genus && x.SPECIES === epithet);
      expect(ref, `no row for ${row.botanicalName} in the FIA file`).toBeDefined();
      expect(Math.abs(row.basicSg - Number(ref!.WOOD_SPGR_GREENVOL_DRYWT))).toBeLessThanOrEqual(SG_TOLERANCE);
      expect(Math.abs(row.sg12 - Number(ref!.WOOD_SPGR_MC12VOL_DRYWT))).toBeLessThanOrEqual(SG_TOLERANCE);
      expect(row.source).toContain(`SPCD ${ref!.SPCD}`);
    },
  );

  it('agrees with the independent FIA table wherever both give a species (redwood aside, whose FIA row mixes growths)', () => {
    for (const row of HANDBOOK_SPECIES.filter((r) => r.checkedIn.sg === 'wood-handbook-species-sg-hardness.csv' && !r.commonName.startsWith('Redwood'))) {
      const [genus, epithet] = row.botanicalName.split(' ');
      const ref = fia.find((x) => x.GENUS === genus && x.SPECIES === epithet);
      if (!ref) continue;
      expect(Math.abs(row.basicSg - Number(ref.WOOD_SPGR_GREENVOL_DRYWT)), row.commonName).toBeLessThanOrEqual(SG_TOLERANCE);
      expect(Math.abs(row.sg12 - Number(ref.WOOD_SPGR_MC12VOL_DRYWT)), row.commonName).toBeLessThanOrEqual(SG_TOLERANCE);
    }
  });

  describe('in the database', () => {
    beforeAll(async () => {
      h = await startHarness({ seed: false });
    });
    afterAll(async () => {
      await h.close();
    });

    it('is written once into an empty species table, with origin handbook and the row citation', () => {
      seedReference(h.database);
      seedReference(h.database);
      const rows = h.database.db.select().from(species).all();
      expect(rows).toHaveLength(HANDBOOK_SPECIES.length);
      for (const seed of HANDBOOK_SPECIES) {
        const row = rows.find((r) => r.commonName === seed.commonName);
        expect(row, seed.commonName).toMatchObject({
          botanicalName: seed.botanicalName,
          basicSg: seed.basicSg,
          sg12: seed.sg12,
          sideHardnessN: seed.sideHardnessN,
          source: seed.source,
          origin: 'handbook',
          createdBy: null,
        });
      }
    });

    it('leaves a species table that already has rows alone', async () => {
      const other = await startHarness({ seed: false });
      try {
        other.database.db.insert(species).values({ commonName: 'Our own wood', botanicalName: 'Unknown', source: 'shop', origin: 'shop-measured' }).run();
        seedReference(other.database);
        expect(
          other.database.db
            .select()
            .from(species)
            .all()
            .map((r) => r.commonName),
        ).toEqual(['Our own wood']);
      } finally {
        await other.close();
      }
    });
  });
});
