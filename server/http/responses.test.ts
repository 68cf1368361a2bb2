import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Response } from 'supertest';
import { species } from '../db/schema/reference';
import { DEMO_PASSWORD } from '../seed';
import { startHarness, type Harness } from '../testing/harness';
import { RESPONSE_CONTRACTS } from '../../shared/schemas/responses';

// Every route's answer against its contract in shared/schemas/responses.ts: the GET routes on a seeded app,
// and the main writes as they build what the GET routes need (a run with a stage, a coupon with a weighing,
// a saved view, a finding signed into the wiki, an import, an invitation). One harness, one pass.

type Agent = Awaited<ReturnType<Harness['signIn']>>;

let h: Harness;
let admin: Agent;
let reviewer: Agent;
const routeKey = (d: { method: string; path: string }) => `${d.method} ${d.path}`;

/** Mismatches found, `route → what did not parse`; the test reports them all at once. */
const failures: string[] = [];
const checkedRoutes = new Set<string>();

/** Parses an answer through the registry's schema for the route; notes the route as checked. */
function check(key: string, res: Response): Response {
  checkedRoutes.add(key);
  const contract = RESPONSE_CONTRACTS[key];
  if (!contract) {
    failures.push(`${key}: no contract in RESPONSE_CONTRACTS`);
    return res;
  }
  if (res.status >= 300) {
    failures.push(`${key}: answered ${res.status} ${JSON.stringify(res.body).slice(0, 300)}`);
    return res;
  }
  if (!('json' in contract)) return res;
  const parsed = contract.json.safeParse(res.body);
  if (!parsed.success) {
    const issues = parsed.error.issues.slice(0, 5).map((i) => `${i.path.join('.')}: ${i.message}`);
    failures.push(`${key}: ${issues.join('; ')}`);
  }
  return res;
}

/** Ids and keys of real records, for the `:id`, `:slug`, `:token` and `:revision` of the GET routes. */
const sample: { ids: Record<string, number>; slug?: string; token?: string; revision?: number } = { ids: {} };

beforeAll(async () => {
  h = await startHarness();
  admin = await h.signIn('admin@demo.test');
  reviewer = await h.signIn('reviewer@demo.test');
  const ago = (hours: number) => new Date(Date.now() - hours * 3_600_000).toISOString();

  // Runs: a new run with its vacuum recorded.
  const run = check('POST /api/runs', await admin.post('/api/runs').send({ chamber: 'Contract chamber', altitudeM: 300 })).body.run;
  check(
    'POST /api/runs/:id/stages',
    await admin.post(`/api/runs/${run.id}/stages`).send({
      stage: 'vacuum',
      startedAt: ago(3),
      barometerKpa: 100.5,
      readings: [{ at: ago(2), gaugeValue: 28, gaugeUnit: 'inHg' }],
    }),
  );
  check('PATCH /api/runs/:id', await admin.patch(`/api/runs/${run.id}`).send({ notes: 'checked against its contract' }));
  sample.ids.runs = run.id;

  // Coupons: one with a dry weighing, which is then corrected.
  const sp = h.database.db.select().from(species).all()[0]!;
  const coupon = check('POST /api/coupons', await admin.post('/api/coupons').send({ tag: 'CONTRACT-01', speciesId: sp.id, role: 'treated' })).body.coupon;
  const weighed = check(
    'POST /api/coupons/:id/weighings',
    await admin.post(`/api/coupons/${coupon.id}/weighings`).send({ stage: 'dry', massG: 12.5, measuredAt: ago(5) }),
  ).body;
  check('PATCH /api/weighings/:id', await admin.patch(`/api/weighings/${weighed.weighing.id}`).send({ massG: 12.6, reason: 'misread the scale' }));
  sample.ids.coupons = coupon.id;

  check('PATCH /api/settings', await admin.patch('/api/settings').send({ shopName: 'Contract shop' }));

  // A saved view, a finding with it as evidence, submitted and signed into the wiki.
  const evidence = check('POST /api/evidence', await admin.post('/api/evidence').send({ title: 'Contract view', view: {} })).body.evidence;
  sample.ids.evidence = evidence.id;
  const finding = check('POST /api/findings', await admin.post('/api/findings').send({ title: 'Contract finding', bodyMd: 'Body.' })).body.finding;
  check('POST /api/findings/:id/evidence', await admin.post(`/api/findings/${finding.id}/evidence`).send({ savedViewId: evidence.id }));
  check('POST /api/findings/:id/submit', await admin.post(`/api/findings/${finding.id}/submit`));
  const approved = check(
    'POST /api/findings/:id/approve',
    await reviewer.post(`/api/findings/${finding.id}/approve`).send({ password: DEMO_PASSWORD, meaning: 'approved-for-wiki' }),
  ).body.finding;
  sample.ids.findings = finding.id;
  sample.slug = approved.wikiSlug;
  sample.revision = 1;

  // An uploaded file, waiting to be mapped.
  const upload = check('POST /api/imports', await admin.post('/api/imports').attach('file', Buffer.from('tag,mass g\nCONTRACT-01,12.7\n'), 'scale.csv'));
  sample.ids.imports = upload.body.id;

  // An invitation, whose token the outbox shows.
  check(
    'POST /api/users/invitations',
    await admin.post('/api/users/invitations').send({ email: 'contract@demo.test', name: 'Contract Person', role: 'viewer' }),
  );
  const mail = (await admin.get('/api/admin/outbox')).body.items.find((m: { to: string }) => m.to === 'contract@demo.test');
  sample.token = /token=([\w-]+)/.exec(mail?.text ?? '')?.[1];

  // First rows of the seeded reference lists and trials.
  for (const base of ['species', 'resins', 'resin-lots', 'trials']) sample.ids[base] = (await admin.get(`/api/${base}`)).body.items[0]?.id;
}, 120_000);

afterAll(async () => {
  await h.close();
});

/** Query strings a GET route needs to answer at all. */
const QUERIES: Record<string, string> = {
  'GET /api/analysis/sample-size': '?differencePct=5',
};

/** The route's path with its parameters filled from the records made above; null when one is unknown. */
function sampleUrl(path: string): string | null {
  let missing = false;
  const url = path
    .replace(/^\/api\/analysis\/runs\/:id/, () => `/api/analysis/runs/${sample.ids.runs}`)
    .replace(/^\/api\/([a-z-]+)\/:id/, (_, base: string) => {
      const id = sample.ids[base];
      if (id === undefined) missing = true;
      return `/api/${base}/${id}`;
    })
    .replace(':slug', () => sample.slug ?? ((missing = true), ''))
    .replace(':token', () => sample.token ?? ((missing = true), ''))
    .replace(':revision', () => String(sample.revision ?? ((missing = true), '')));
  return missing || url.includes(':') ? null : url;
}

describe('response contracts (shared/schemas/responses.ts)', () => {
  it('names every mounted route, and only mounted routes', () => {
    const mounted = h.lumenbook.declaredRoutes.map(routeKey);
    expect(
      mounted.filter((k) => !(k in RESPONSE_CONTRACTS)),
      'mounted routes without a response contract: add each to RESPONSE_CONTRACTS in shared/schemas/responses.ts (json(schema), or notJson with the reason for a CSV or file download)',
    ).toEqual([]);
    expect(
      Object.keys(RESPONSE_CONTRACTS).filter((k) => !mounted.includes(k)),
      'contracts for routes that are not mounted',
    ).toEqual([]);
  });

  it("every GET route's answer on the seeded app, and the main writes', parse through their contract", async () => {
    const unreachable: string[] = [];
    for (const d of h.lumenbook.declaredRoutes.filter((r) => r.method === 'GET')) {
      const key = routeKey(d);
      const contract = RESPONSE_CONTRACTS[key];
      // Files other than CSV (photos, archives) are checked by their own features' tests.
      if (!contract || ('notJson' in contract && !contract.notJson.includes('CSV'))) continue;
      const url = sampleUrl(d.path);
      if (url === null) {
        unreachable.push(key);
        continue;
      }
      const res = await admin.get(url + (QUERIES[key] ?? ''));
      if ('json' in contract) check(key, res);
      // A CSV download answers CSV, not the JSON envelope of an error.
      else if (contract.notJson.includes('CSV') && !/^text\/csv/.test(String(res.headers['content-type'])))
        failures.push(`${key}: answered ${res.status} ${String(res.headers['content-type'])}, not a CSV file`);
    }
    expect(unreachable, 'GET routes with a parameter this test cannot fill; make a record for them above').toEqual([]);
    expect(failures).toEqual([]);
    // The writes made above were checked too.
    for (const k of ['POST /api/runs', 'POST /api/runs/:id/stages', 'POST /api/coupons', 'POST /api/findings/:id/approve', 'POST /api/imports'])
      expect(checkedRoutes.has(k), k).toBe(true);
  });
});
