import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, asc, eq, isNotNull } from 'drizzle-orm';
import { startHarness, type Harness } from '../../testing/harness';
import { coupons, weighings } from '../../db/schema/coupons';
import { resins, species } from '../../db/schema/reference';
import { couponResults } from '../../db/schema/results';
import { runStages, runs } from '../../db/schema/runs';
import { trials } from '../../db/schema/trials';
import { fitLinear, fitMultiple, summarize, welchTest } from '../../../shared/domain/index';
import { twoSampleSampleSize } from '../../../shared/domain/power';
import { DEFAULT_WPG_SD } from './analysis.service';

type Agent = Awaited<ReturnType<Harness['signIn']>>;
let h: Harness;
let as: Record<'admin' | 'reviewer' | 'technician' | 'viewer', Agent>;
let trialId: number;
// The demo shop's names (invented), spelled out: a feature's test does not import another feature.
const DEMO_TRIAL_CODE = 'T26-001';
const DEMO_RESINS = { clear: 'Crystal Pane 90', dyed: 'Ember Pane 90 (dyed)' };

beforeAll(async () => {
  h = await startHarness();
  as = {
    admin: await h.signIn('admin@demo.test'),
    reviewer: await h.signIn('reviewer@demo.test'),
    technician: await h.signIn('tech@demo.test'),
    viewer: await h.signIn('viewer@demo.test'),
  };
  trialId = h.database.db.select().from(trials).where(eq(trials.code, DEMO_TRIAL_CODE)).get()!.id;
});
afterAll(async () => {
  await h.close();
});

const resinId = (name: string) => h.database.db.select().from(resins).where(eq(resins.name, name)).get()!.id;
const speciesId = (name: string) => h.database.db.select().from(species).where(eq(species.commonName, name)).get()!.id;

/** The included treated coupons of the demo trial, straight from the results table. */
function treatedRows(where = eq(couponResults.trialId, trialId)) {
  return h.database.db
    .select()
    .from(couponResults)
    .where(and(where, eq(couponResults.role, 'treated'), isNotNull(couponResults.wpgPct), isNotNull(couponResults.drySg)))
    .orderBy(asc(couponResults.couponId))
    .all();
}

describe('analysis routes: who may do what', () => {
  it('answers 401 without a session on every analysis and evidence route', async () => {
    const anon = h.agent();
    const calls = [
      anon.get('/api/analysis/overview'),
      anon.get('/api/analysis/summary'),
      anon.get('/api/analysis/fit'),
      anon.get('/api/analysis/coupons'),
      anon.post('/api/analysis/compare').send({ a: { resinId: 1 }, b: { resinId: 2 } }),
      anon.get('/api/analysis/runs/1/expected'),
      anon.get('/api/analysis/sample-size?differencePct=5'),
      anon.get('/api/evidence'),
      anon.get('/api/evidence/1'),
      anon.post('/api/evidence').send({ title: 'x', view: {} }),
    ];
    for (const res of await Promise.all(calls)) expect(res.status).toBe(401);
  });

  it('lets every role read analyses, but only technicians and above save a view', async () => {
    for (const agent of Object.values(as)) {
      expect((await agent.get(`/api/analysis/overview?trialId=${trialId}`)).status).toBe(200);
      expect((await agent.post('/api/analysis/compare').send({ a: { resinId: 1 }, b: { resinId: 2 } })).status).toBe(200);
    }
    const body = { title: 'Demo trial as it stands', view: { filters: { trialId: [trialId] } } };
    expect((await as.viewer.post('/api/evidence').send(body)).status).toBe(403);
    for (const agent of [as.technician, as.reviewer, as.admin]) expect((await agent.post('/api/evidence').send(body)).status).toBe(201);
  });

  it('refuses contradictory filters with the field named', async () => {
    const res = await as.viewer.get('/api/analysis/overview?thicknessMinMm=30&thicknessMaxMm=10');
    expect(res.status).toBe(400);
    expect(res.body.error.fieldErrors).toHaveProperty('thicknessMaxMm');
    const bad = await as.viewer.get('/api/analysis/overview?speciesId=abc');
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fieldErrors).some((k) => k.startsWith('speciesId'))).toBe(true);
  });
});

describe('analysis numbers equal the domain core on the demo data', () => {
  it('fits WPG on SG, on thickness and on both exactly as fitLinear and fitMultiple do', async () => {
    const res = await as.viewer.get(`/api/analysis/overview?trialId=${trialId}`);
    expect(res.status).toBe(200);
    const rows = treatedRows();
    expect(rows.length).toBeGreaterThanOrEqual(10);
    expect(res.body.counts.treatedIncluded).toBe(rows.length);
    const core = fitLinear(
      rows.map((r) => r.drySg!),
      rows.map((r) => r.wpgPct!),
    );
    const fit = res.body.densityFit;
    expect(fit.n).toBe(core.n);
    expect(fit.coefficients[0].estimate).toBe(core.intercept);
    expect(fit.coefficients[1].estimate).toBe(core.slope);
    expect(fit.coefficients[1].se).toBe(core.slopeSe);
    expect(fit.r2).toBe(core.r2);
    expect(fit.residualSd).toBe(core.residualSd);
    expect(res.body.plots.wpgVsSg.points).toHaveLength(rows.length);

    // Every demo coupon of one condition has the same nominal thickness, but the measured ones differ.
    if (res.body.multipleFit) {
      const m = fitMultiple(
        rows.map((r) => [r.drySg!, r.thicknessMm!]),
        rows.map((r) => r.wpgPct!),
      );
      expect(res.body.multipleFit.coefficients.map((c: { estimate: number }) => c.estimate)).toEqual(m.coefficients);
      expect(res.body.multipleFit.coefficients.map((c: { se: number }) => c.se)).toEqual(m.standardErrors);
    } else {
      expect(res.body.fitNotes.join(' ')).toMatch(/together/);
    }
  });

  it('summarises each species × resin with the core summarize', async () => {
    const res = await as.viewer.get(`/api/analysis/summary?trialId=${trialId}&groupBy=species,resin`);
    expect(res.status).toBe(200);
    const rows = treatedRows();
    for (const g of res.body.groups) {
      const values = rows.filter((r) => r.speciesId === g.speciesId && r.resinId === g.resinId).map((r) => r.wpgPct!);
      expect(g.nCoupons).toBe(values.length);
      if (values.length >= 2) {
        const s = summarize(values);
        expect(g.wpg).toEqual({ n: s.n, mean: s.mean, sd: s.sd, ci95: s.ci95 });
      }
    }
  });

  it('compares two resins on one species with the core welchTest', async () => {
    const maple = speciesId('Maple, red');
    const clear = resinId(DEMO_RESINS.clear);
    const dyed = resinId(DEMO_RESINS.dyed);
    const res = await as.viewer
      .post('/api/analysis/compare')
      .send({ filters: { trialId: [trialId] }, a: { speciesId: maple, resinId: clear }, b: { speciesId: maple, resinId: dyed }, metric: 'wpgPct' });
    expect(res.status).toBe(200);
    const rows = treatedRows();
    const a = rows.filter((r) => r.speciesId === maple && r.resinId === clear).map((r) => r.wpgPct!);
    const b = rows.filter((r) => r.speciesId === maple && r.resinId === dyed).map((r) => r.wpgPct!);
    expect(res.body.a.n).toBe(a.length);
    expect(res.body.b.n).toBe(b.length);
    expect(res.body.welch).toEqual(welchTest(a, b));
    expect(res.body.sentence).toContain(`${a.length} coupons`);
    expect(res.body.effectSizeNote).toMatch(/pooled standard deviation/);
  });

  it('lists coupons with missing stages as excluded, with the reason', async () => {
    const res = await as.viewer.get(`/api/analysis/overview?trialId=${trialId}`);
    const all = h.database.db
      .select()
      .from(couponResults)
      .where(and(eq(couponResults.trialId, trialId), eq(couponResults.role, 'treated')))
      .all();
    const included = treatedRows().length;
    expect(res.body.excluded.length).toBe(all.length - included);
    expect(res.body.excluded.length).toBeGreaterThan(0);
    const reasons = new Set(res.body.excluded.flatMap((e: { reasons: string[] }) => e.reasons));
    expect([...reasons].some((r) => /No cured weighing|No dry weighing/.test(r as string))).toBe(true);
    const list = await as.viewer.get(`/api/analysis/coupons?trialId=${trialId}&pageSize=5`);
    expect(list.status).toBe(200);
    expect(list.body.items).toHaveLength(5);
    expect(list.body.total).toBe(all.length + res.body.counts.controls);
    expect(list.body.excluded).toEqual(res.body.excluded);
  });

  it('answers the fit route per model, the same as the overview', async () => {
    const o = (await as.viewer.get(`/api/analysis/overview?trialId=${trialId}`)).body;
    const f = await as.viewer.get(`/api/analysis/fit?trialId=${trialId}&model=density`);
    expect(f.status).toBe(200);
    expect(f.body.fit).toEqual(o.densityFit);
    expect(f.body.theoreticalMax).toEqual(o.theoreticalMax);
    const t = await as.viewer.get(`/api/analysis/fit?trialId=${trialId}&model=thickness`);
    expect(t.body.fit).toEqual(o.thicknessFit);
  });
});

describe('expected against actual, and sample size', () => {
  it('gives each coupon of a finished run its expected WPG from the other runs', async () => {
    const run = h.database.db.select().from(runs).where(eq(runs.code, 'R26-002')).get()!;
    const res = await as.viewer.get(`/api/analysis/runs/${run.id}/expected`);
    expect(res.status).toBe(200);
    expect(res.body.runId).toBe(run.id);
    expect(res.body.coupons.length).toBeGreaterThan(0);
    for (const c of res.body.coupons) {
      if (c.expectedWpgPct === null) continue;
      const row = h.database.db.select().from(couponResults).where(eq(couponResults.couponId, c.id)).get()!;
      const basis = res.body.basis.find((b: { species: string; resin: string }) => b.species === c.species && b.resin === c.resin);
      expect(c.expectedWpgPct).toBeCloseTo(basis.fillFraction * row.maxWpgPct!, 10);
    }
    expect(['short', 'as-expected', 'above', 'no-history', 'no-data']).toContain(res.body.run.status);
    expect((await as.viewer.get('/api/analysis/runs/999999/expected')).status).toBe(404);
  });

  it('plans coupons per condition from the shop spread, or from the stated default', async () => {
    const maple = speciesId('Maple, red');
    const clear = resinId(DEMO_RESINS.clear);
    const values = h.database.db
      .select()
      .from(couponResults)
      .where(and(eq(couponResults.speciesId, maple), eq(couponResults.resinId, clear), eq(couponResults.role, 'treated'), isNotNull(couponResults.wpgPct)))
      .all()
      .map((r) => r.wpgPct!);
    const res = await as.viewer.get(`/api/analysis/sample-size?speciesId=${maple}&resinId=${clear}&differencePct=5&planned=2`);
    expect(res.status).toBe(200);
    const sd = summarize(values).sd;
    expect(res.body.sdSource).toBe('shop');
    expect(res.body.sd).toBe(sd);
    expect(res.body.nPerCondition).toBe(twoSampleSampleSize(5, sd).nPerGroup);
    expect(res.body.warning).toMatch(/The plan has 2 coupons per condition/);

    const fallback = await as.viewer.get(`/api/analysis/sample-size?differencePct=8`);
    expect(fallback.body.sdSource).toBe('default');
    expect(fallback.body.sd).toBe(DEFAULT_WPG_SD);
    // Δ = SD: R's power.t.test(delta = 1, power = .8) gives n = 16.71 (from memory), so 17.
    expect(fallback.body.nPerCondition).toBe(17);
    expect((await as.viewer.get('/api/analysis/sample-size?differencePct=0')).status).toBe(400);
  });
});

describe('saved views are evidence', () => {
  it('freezes the numbers, and says a newer answer exists after a reading is corrected', async () => {
    const maple = speciesId('Maple, red');
    const view = {
      filters: { trialId: [trialId] },
      sgBasis: 'measured',
      compare: { a: { speciesId: maple, resinId: resinId(DEMO_RESINS.clear) }, b: { speciesId: maple, resinId: resinId(DEMO_RESINS.dyed) }, metric: 'wpgPct' },
    };
    const saved = await as.technician.post('/api/evidence').send({ title: 'Clear against dyed in red maple', view });
    expect(saved.status).toBe(201);
    const id = saved.body.evidence.id;
    expect(saved.body.newerAnswer.exists).toBe(false);
    const overviewNow = (await as.viewer.get(`/api/analysis/overview?trialId=${trialId}`)).body;
    expect(saved.body.evidence.snapshot.numbers.overview).toEqual(overviewNow);
    expect(saved.body.evidence.snapshot.numbers.compare.welch).not.toBeNull();
    expect(saved.body.evidence.snapshot.plot.data.points.length).toBe(overviewNow.plots.wpgVsSg.points.length);

    const before = await as.viewer.get(`/api/evidence/${id}`);
    expect(before.body.newerAnswer.exists).toBe(false);

    // Correct one cured weighing of an included coupon.
    const row = treatedRows()[0]!;
    const w = h.database.db
      .select()
      .from(weighings)
      .where(and(eq(weighings.couponId, row.couponId), eq(weighings.stage, 'cured')))
      .all()
      .find((x) => x.supersededBy === null && x.deletedAt === null)!;
    const fix = await as.technician.patch(`/api/weighings/${w.id}`).send({ massG: w.massG + 1.5, reason: 'balance re-zeroed, weighed again' });
    expect(fix.status, JSON.stringify(fix.body)).toBe(200);

    const after = await as.viewer.get(`/api/evidence/${id}`);
    expect(after.status).toBe(200);
    expect(after.body.newerAnswer.exists).toBe(true);
    expect(after.body.evidence.snapshot).toEqual(saved.body.evidence.snapshot);
    expect(after.body.evidence.fingerprint).toBe(saved.body.evidence.fingerprint);

    const list = await as.viewer.get('/api/evidence');
    expect(list.body.items.some((e: { id: number }) => e.id === id)).toBe(true);
    expect((await as.viewer.get('/api/evidence/999999')).status).toBe(404);
  });
});

describe('cached answers', () => {
  it('serves a repeated view unchanged, and a new answer as soon as a results row is written', async () => {
    const url = `/api/analysis/overview?trialId=${trialId}`;
    const firstRes = await as.viewer.get(url);
    const first = firstRes.body;
    const again = await as.viewer.get(url);
    expect(again.body).toEqual(first);
    // The same answer is sent from the same text: one ETag, and a 304 for a browser that holds it.
    const etag = firstRes.headers.etag as string;
    expect(again.headers.etag).toBe(etag);
    expect((await as.viewer.get(url).set('If-None-Match', etag)).status).toBe(304);
    const row = treatedRows()[0]!;
    const group = (o: { groups: { speciesId: number; resinId: number | null; wpg: { mean: number } | null }[] }) =>
      o.groups.find((g) => g.speciesId === row.speciesId && g.resinId === row.resinId)!;
    try {
      // Any writer counts, even one that goes round the measurements module (here, the test itself).
      h.database.db
        .update(couponResults)
        .set({ wpgPct: row.wpgPct! + 30 })
        .where(eq(couponResults.couponId, row.couponId))
        .run();
      const afterRes = await as.viewer.get(url);
      const after = afterRes.body;
      expect(group(after).wpg!.mean).toBeGreaterThan(group(first).wpg!.mean);
      expect(afterRes.headers.etag).not.toBe(etag);
      const compared = await as.viewer
        .post('/api/analysis/compare')
        .send({ filters: { trialId: [trialId] }, a: { resinId: row.resinId! }, b: { role: 'control' }, metric: 'wpgPct' });
      expect(compared.status).toBe(200);
      expect(compared.body.a.mean).toBeCloseTo(
        summarize(
          h.database.db
            .select()
            .from(couponResults)
            .where(and(eq(couponResults.trialId, trialId), eq(couponResults.resinId, row.resinId!), isNotNull(couponResults.wpgPct)))
            .all()
            .map((r) => r.wpgPct!),
        ).mean,
        10,
      );
    } finally {
      h.database.db.update(couponResults).set({ wpgPct: row.wpgPct }).where(eq(couponResults.couponId, row.couponId)).run();
    }
    expect((await as.viewer.get(url)).body).toEqual(first);
  });
});

describe('the date filter', () => {
  it("keeps the coupons treated in the range (their run's cure, else its soak), whatever day they were entered", async () => {
    const treatedOn = new Map<number, string>();
    const stages = h.database.db.select().from(runStages).all();
    for (const st of stages) if (st.stage === 'soak' && !treatedOn.has(st.runId)) treatedOn.set(st.runId, st.startedAt.slice(0, 10));
    for (const st of stages) if (st.stage === 'cure') treatedOn.set(st.runId, st.startedAt.slice(0, 10));
    const all = h.database.db.select().from(couponResults).all();
    const run = all.find((r) => r.role === 'treated' && r.runId !== null && treatedOn.has(r.runId))!.runId!;
    const day = treatedOn.get(run)!;
    const runsThatDay = new Set([...treatedOn].filter(([, d]) => d === day).map(([id]) => id));
    const treatedThatDay = all.filter((r) => r.runId !== null && runsThatDay.has(r.runId));
    const trialsThatDay = new Set(treatedThatDay.map((r) => r.trialId).filter((t) => t !== null));
    const expected = new Set([
      ...treatedThatDay.map((r) => r.couponId),
      ...all.filter((r) => r.role === 'control' && r.trialId !== null && trialsThatDay.has(r.trialId)).map((r) => r.couponId),
    ]);
    expect(treatedThatDay.length).toBeGreaterThan(0);

    // Entry dates play no part: move the run's coupons' entry far from the day, and another coupon's onto it.
    const entered = new Map(
      h.database.db
        .select({ id: coupons.id, createdAt: coupons.createdAt })
        .from(coupons)
        .all()
        .map((c) => [c.id, c.createdAt]),
    );
    const outsider = all.find((r) => !expected.has(r.couponId))!;
    const setEntry = h.database.sqlite.prepare('update coupons set created_at = ? where id = ?');
    try {
      for (const r of treatedThatDay) setEntry.run('1999-01-01T00:00:00.000Z', r.couponId);
      setEntry.run(`${day}T12:00:00.000Z`, outsider.couponId);
      const res = await as.viewer.get(`/api/analysis/coupons?from=${day}&to=${day}&pageSize=500`);
      expect(res.status).toBe(200);
      const items = res.body.items as { id: number; role: string; treatedOn: string | null }[];
      expect(new Set(items.map((c) => c.id))).toEqual(expected);
      for (const c of items) if (c.role === 'treated') expect(c.treatedOn).toBe(day);
    } finally {
      for (const [id, at] of entered) setEntry.run(at, id);
    }

    const none = await as.viewer.get('/api/analysis/overview?from=1990-01-01&to=1990-01-02');
    expect(none.body.counts.matched).toBe(0);
  });
});
