import Papa from 'papaparse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startHarness, type Harness } from '../testing/harness';
import { resins, species } from '../db/schema/reference';
import { optionsResponseSchema } from '../../shared/schemas/options';

// The lists a shop works through (coupons, runs, trials): sort by a whitelisted column, search, filters,
// keyset paging, CSV export safe against formula injection (OWASP "CSV Injection"), and the pickers' light lists.

type Agent = Awaited<ReturnType<Harness['signIn']>>;
let h: Harness;
let tech: Agent;
let viewer: Agent;
let mapleId: number;
let resinId: number;
const HYPERLINK = '=HYPERLINK("http://example.invalid","open me")';
const at = (hoursAgo: number) => new Date(Date.now() - hoursAgo * 3_600_000).toISOString();
const ids: Record<string, number> = {};

beforeAll(async () => {
  h = await startHarness();
  tech = await h.signIn('tech@demo.test');
  viewer = await h.signIn('viewer@demo.test');
  mapleId = h.database.db
    .select()
    .from(species)
    .all()
    .find((s) => s.commonName === 'Maple, red')!.id;
  resinId = h.database.db.select().from(resins).all()[0]!.id;
  // Five coupons of our own, tagged so a search finds only them.
  for (const [tag, role, board] of [
    ['LQ-3', 'treated', HYPERLINK],
    ['LQ-1', 'treated', 'board 1'],
    ['LQ-5', 'control', 'board 1'],
    ['LQ-2', 'treated', '+SUM(1,2)'],
    ['LQ-4', 'treated', null],
  ] as const) {
    const res = await tech.post('/api/coupons').send({ tag, speciesId: mapleId, role, sourceBoard: board });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    ids[tag] = res.body.coupon.id;
  }
  for (const tag of ['LQ-1', 'LQ-2', 'LQ-5']) {
    expect((await tech.post(`/api/coupons/${ids[tag]}/weighings`).send({ stage: 'dry', massG: 30, measuredAt: at(10) })).status).toBe(201);
  }
  expect((await tech.post(`/api/coupons/${ids['LQ-1']}/weighings`).send({ stage: 'soaked', massG: 45, measuredAt: at(5) })).status).toBe(201);
  expect((await tech.post(`/api/coupons/${ids['LQ-1']}/weighings`).send({ stage: 'cured', massG: 44, measuredAt: at(2) })).status).toBe(201);
}, 60_000);
afterAll(async () => {
  await h.close();
});

const tags = (res: { body: { items: { tag: string }[] } }) => res.body.items.map((i) => i.tag);
const csv = (text: string) => Papa.parse<string[]>(text.trim()).data;

describe('the coupon list', () => {
  it('sorts by a whitelisted column either way and refuses any other, naming sort', async () => {
    expect(tags(await viewer.get('/api/coupons?q=LQ-&sort=tag'))).toEqual(['LQ-1', 'LQ-2', 'LQ-3', 'LQ-4', 'LQ-5']);
    expect(tags(await viewer.get('/api/coupons?q=LQ-&sort=-tag'))).toEqual(['LQ-5', 'LQ-4', 'LQ-3', 'LQ-2', 'LQ-1']);
    const bad = await viewer.get('/api/coupons?sort=notes');
    expect(bad.status).toBe(400);
    expect(bad.body.error.fieldErrors.sort).toBeDefined();
  });

  it('searches the tag, with % and _ taken literally', async () => {
    expect(tags(await viewer.get('/api/coupons?q=lq-3'))).toEqual(['LQ-3']);
    expect((await viewer.get('/api/coupons?q=LQ%25')).body.total).toBe(0);
  });

  it('filters by what a coupon still waits for; soaked and cured concern treated coupons only', async () => {
    expect(tags(await viewer.get('/api/coupons?q=LQ-&waitingFor=dry-weighing'))).toEqual(['LQ-3', 'LQ-4']);
    expect(tags(await viewer.get('/api/coupons?q=LQ-&waitingFor=cured-weighing'))).toEqual(['LQ-2', 'LQ-3', 'LQ-4']);
    expect(tags(await viewer.get('/api/coupons?q=LQ-&waitingFor=cured-weighing&role=treated&speciesId=' + mapleId))).toEqual(['LQ-2', 'LQ-3', 'LQ-4']);
    expect((await viewer.get('/api/coupons?q=LQ-&waitingFor=cured-weighing')).body.total).toBe(3);
    expect((await viewer.get('/api/coupons?waitingFor=later')).status).toBe(400);
  });

  it('reads on from a cursor (keyset) to the same rows as the next page', async () => {
    const first = await viewer.get('/api/coupons?q=LQ-&sort=-tag&pageSize=2');
    expect(tags(first)).toEqual(['LQ-5', 'LQ-4']);
    expect(first.body.nextCursor).toEqual(expect.any(String));
    const next = await viewer.get(`/api/coupons?q=LQ-&sort=-tag&pageSize=2&after=${first.body.nextCursor}`);
    expect(tags(next)).toEqual(tags(await viewer.get('/api/coupons?q=LQ-&sort=-tag&pageSize=2&page=2')));
    const last = await viewer.get(`/api/coupons?q=LQ-&sort=-tag&pageSize=2&after=${next.body.nextCursor}`);
    expect(tags(last)).toEqual(['LQ-1']);
    expect(last.body.nextCursor).toBeNull();
    // A metric column too: blanks go last whichever way the list is sorted (as in a spreadsheet).
    // Only LQ-1 has a WPG (dry and cured weighings), so it leads both ways.
    for (const sort of ['wpgPct', '-wpgPct']) expect(tags(await viewer.get(`/api/coupons?q=LQ-&sort=${sort}&pageSize=5`))[0]).toBe('LQ-1');
    const bySg = await viewer.get('/api/coupons?q=LQ-&sort=drySg&pageSize=3');
    const rest = await viewer.get(`/api/coupons?q=LQ-&sort=drySg&pageSize=3&after=${bySg.body.nextCursor}`);
    expect(new Set([...tags(bySg), ...tags(rest)]).size).toBe(5);
    expect((await viewer.get('/api/coupons?after=not-a-cursor')).status).toBe(400);
  });

  it('gives the same pages by number (offset) as by walking the cursors, for every sort and with a results filter', async () => {
    for (const query of ['sort=tag', 'sort=-tag', 'sort=createdAt', 'sort=drySg', 'sort=-wpgPct', 'sort=tag&waitingFor=cured-weighing']) {
      const walked: string[][] = [];
      let res = await viewer.get(`/api/coupons?q=LQ-&${query}&pageSize=2`);
      walked.push(tags(res));
      while (res.body.nextCursor) {
        res = await viewer.get(`/api/coupons?q=LQ-&${query}&pageSize=2&after=${res.body.nextCursor}`);
        if (res.body.items.length) walked.push(tags(res));
      }
      const numbered: string[][] = [];
      for (let page = 1; page <= walked.length; page++) numbered.push(tags(await viewer.get(`/api/coupons?q=LQ-&${query}&pageSize=2&page=${page}`)));
      expect(numbered, query).toEqual(walked);
    }
  });

  it('exports the filtered list as CSV, formula-looking text neutralised', async () => {
    const res = await viewer.get('/api/coupons/export.csv?q=LQ-&sort=tag');
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    expect(res.headers['content-disposition']).toMatch(/attachment; filename="coupons.csv"/);
    const rows = csv(res.text);
    const head = rows[0]!;
    expect(head.slice(0, 3)).toEqual(['tag', 'trial', 'condition']);
    expect(rows.slice(1).map((r) => r[0])).toEqual(['LQ-1', 'LQ-2', 'LQ-3', 'LQ-4', 'LQ-5']);
    const board = head.indexOf('source_board');
    const byTag = new Map(rows.slice(1).map((r) => [r[0], r]));
    expect(byTag.get('LQ-3')![board]).toBe(`'${HYPERLINK}`);
    expect(byTag.get('LQ-2')![board]).toBe(`'+SUM(1,2)`);
    expect(byTag.get('LQ-1')![head.indexOf('cured_mass_g')]).toBe('44');
    const waiting = csv((await viewer.get('/api/coupons/export.csv?q=LQ-&waitingFor=dry-weighing')).text);
    expect(waiting.slice(1).map((r) => r[0])).toEqual(['LQ-3', 'LQ-4']);
    expect((await viewer.get('/api/coupons/export.csv?page=2')).status).toBe(400);
  });
});

describe('the run list', () => {
  beforeAll(async () => {
    for (const [code, chamber] of [
      ['LQR-B', 'Pot north'],
      ['LQR-A', '@chamber'],
      ['LQR-C', 'Pot south'],
    ] as const) {
      const res = await tech.post('/api/runs').send({ code, chamber });
      expect(res.status, JSON.stringify(res.body)).toBe(201);
      ids[code] = res.body.run.id;
    }
    const started = await tech.post(`/api/runs/${ids['LQR-C']}/stages`).send({ stage: 'drying', startedAt: at(30), endedAt: at(20) });
    expect(started.status, JSON.stringify(started.body)).toBe(200);
    expect((await tech.post(`/api/runs/${ids['LQR-C']}/stages`).send({ stage: 'vacuum', startedAt: at(3) })).status).toBe(200);
    expect((await tech.post(`/api/runs/${ids['LQR-B']}/stages`).send({ stage: 'drying', startedAt: at(3) })).status).toBe(200);
  });
  const codes = (res: { body: { items: { code: string }[] } }) => res.body.items.map((i) => i.code);

  it('searches code and chamber, sorts by chamber, filters by the latest stage', async () => {
    expect(codes(await viewer.get('/api/runs?q=LQR-&sort=code'))).toEqual(['LQR-A', 'LQR-B', 'LQR-C']);
    expect(codes(await viewer.get('/api/runs?q=pot&sort=-chamber'))).toEqual(['LQR-C', 'LQR-B']);
    expect(codes(await viewer.get('/api/runs?q=LQR-&stage=drying'))).toEqual(['LQR-B']);
    expect(codes(await viewer.get('/api/runs?q=LQR-&stage=vacuum'))).toEqual(['LQR-C']);
    expect(codes(await viewer.get('/api/runs?q=LQR-&status=planned'))).toEqual(['LQR-A']);
    expect((await viewer.get('/api/runs?sort=notes')).status).toBe(400);
  });

  it('answers a remembered page until the next write, then the new records', async () => {
    expect(codes(await viewer.get('/api/runs?q=LQM-'))).toEqual([]);
    expect(codes(await viewer.get('/api/runs?q=LQM-'))).toEqual([]);
    const added = await tech.post('/api/runs').send({ code: 'LQM-1', chamber: 'Pot east' });
    expect(added.status, JSON.stringify(added.body)).toBe(201);
    expect(codes(await viewer.get('/api/runs?q=LQM-'))).toEqual(['LQM-1']);
    const started = await tech.post(`/api/runs/${added.body.run.id}/stages`).send({ stage: 'drying', startedAt: at(1) });
    expect(started.status, JSON.stringify(started.body)).toBe(200);
    expect((await viewer.get('/api/runs?q=LQM-')).body.items[0].progress.current).toBe('drying');
  });

  it('exports the runs as CSV, neutralising a chamber that starts like a formula', async () => {
    const res = await viewer.get('/api/runs/export.csv?q=LQR-&sort=code');
    expect(res.status).toBe(200);
    const rows = csv(res.text);
    expect(rows[0]!.slice(0, 2)).toEqual(['code', 'chamber']);
    expect(rows.slice(1).map((r) => [r[0], r[1]])).toEqual([
      ['LQR-A', `'@chamber`],
      ['LQR-B', 'Pot north'],
      ['LQR-C', 'Pot south'],
    ]);
  });
});

describe('the trial list', () => {
  it('exports the trials as CSV, a title like =HYPERLINK(...) made inert', async () => {
    const created = await tech.post('/api/trials').send({
      title: HYPERLINK,
      question: 'Does the export keep formulas out?',
      controlsPerSpecies: 1,
      conditions: [{ speciesId: mapleId, resinId, processLabel: 'plain', couponsWanted: 3 }],
    });
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const res = await viewer.get(`/api/trials/export.csv?q=${encodeURIComponent('example.invalid')}`);
    expect(res.status).toBe(200);
    const rows = csv(res.text);
    expect(rows[0]!.slice(0, 3)).toEqual(['code', 'title', 'status']);
    expect(rows).toHaveLength(2);
    expect(rows[1]![1]).toBe(`'${HYPERLINK}`);
    expect(rows[1]![rows[0]!.indexOf('planned')]).toBe('4');
  });
});

describe('picker options', () => {
  it.each(['trials', 'runs', 'species', 'resins', 'resin-lots'])('/api/%s/options answers id, code and label', async (what) => {
    const res = await viewer.get(`/api/${what}/options`);
    expect(res.status).toBe(200);
    const parsed = optionsResponseSchema.parse(res.body);
    expect(parsed.items.length).toBeGreaterThan(0);
  });

  it('searches and limits', async () => {
    const runs = optionsResponseSchema.parse((await viewer.get('/api/runs/options?q=LQR-')).body).items;
    expect(runs.map((r) => r.code).sort()).toEqual(['LQR-A', 'LQR-B', 'LQR-C']);
    expect(runs.find((r) => r.code === 'LQR-B')?.label).toBe('LQR-B · Pot north');
    expect((await viewer.get('/api/species/options?limit=1')).body.items).toHaveLength(1);
    expect((await viewer.get('/api/species/options?limit=0')).status).toBe(400);
    expect((await h.agent().get('/api/trials/options')).status).toBe(401);
  });
});
