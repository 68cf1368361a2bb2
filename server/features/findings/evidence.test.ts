import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { startHarness, type Harness } from '../../testing/harness';
import { findingEvidence } from '../../db/schema/findings';
import { DEMO_PASSWORD } from '../../seed';

type Agent = Awaited<ReturnType<Harness['signIn']>>;
let h: Harness;
let tech: Agent;
let reviewer: Agent;
let viewer: Agent;

async function saveView(title: string): Promise<number> {
  const res = await tech.post('/api/evidence').send({ title, view: {} });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.evidence.id as number;
}

beforeAll(async () => {
  h = await startHarness();
  tech = await h.signIn('tech@demo.test');
  reviewer = await h.signIn('reviewer@demo.test');
  viewer = await h.signIn('viewer@demo.test');
});
afterAll(async () => {
  await h.close();
});

describe('evidence on findings', () => {
  it("copies the saved view's snapshot when attached, draws its plot as SVG, and never follows the saved view again", async () => {
    const viewId = await saveView('Uptake against density, demo');
    const f = (await tech.post('/api/findings').send({ title: 'With evidence', bodyMd: 'See the plot.' })).body.finding;
    const views = await tech.get('/api/findings/attachable-views');
    expect(views.body.items.map((v: { id: number }) => v.id)).toContain(viewId);
    expect((await viewer.post(`/api/findings/${f.id}/evidence`).send({ savedViewId: viewId })).status).toBe(403);
    expect((await tech.post(`/api/findings/${f.id}/evidence`).send({ savedViewId: 999999 })).body.error.fieldErrors.savedViewId).toBeDefined();
    const res = await tech.post(`/api/findings/${f.id}/evidence`).send({ savedViewId: viewId });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const ev = res.body.finding.evidence[0];
    expect(ev).toMatchObject({ position: 1, savedViewId: viewId, title: 'Uptake against density, demo', kind: 'saved-view' });
    const original = await tech.get(`/api/evidence/${viewId}`);
    expect(ev.snapshot.numbers).toEqual(original.body.evidence.snapshot.numbers);
    expect(ev.snapshot.fingerprint).toBe(original.body.evidence.fingerprint);
    expect(ev.svg).toMatch(/^<svg[^>]*viewBox=/);
    expect(ev.svg).not.toMatch(/<script|on\w+=/i);
    // The saved view is changed behind the app's back: the finding keeps its copy.
    h.database.sqlite.prepare("update evidence set title = 'Changed', snapshot = json_set(snapshot, '$.computedAt', '1999-01-01') where id = ?").run(viewId);
    const again = (await viewer.get(`/api/findings/${f.id}`)).body.finding.evidence[0];
    expect(again.title).toBe('Uptake against density, demo');
    expect(again.snapshot.computedAt).toBe(ev.snapshot.computedAt);
  });

  it('signs the evidence with the text, refuses changes after approval (409) and detects an altered snapshot', async () => {
    const viewId = await saveView('Signed view');
    const f = (await tech.post('/api/findings').send({ title: 'Signed with evidence', bodyMd: 'Body.' })).body.finding;
    const attached = (await tech.post(`/api/findings/${f.id}/evidence`).send({ savedViewId: viewId })).body.finding;
    await tech.post(`/api/findings/${f.id}/submit`);
    // In review, evidence is as frozen as the text.
    expect((await tech.post(`/api/findings/${f.id}/evidence`).send({ savedViewId: viewId })).status).toBe(409);
    const ok = await reviewer.post(`/api/findings/${f.id}/approve`).send({ password: DEMO_PASSWORD, meaning: 'approved-for-wiki' });
    expect(ok.status).toBe(200);
    expect((await tech.post(`/api/findings/${f.id}/evidence`).send({ savedViewId: viewId })).status).toBe(409);
    expect((await tech.delete(`/api/findings/${f.id}/evidence/${attached.evidence[0].id}`)).status).toBe(409);
    const page = (await viewer.get(`/api/wiki/${ok.body.finding.wikiSlug}`)).body.page;
    expect(page.evidence[0].svg).toBe(attached.evidence[0].svg);
    expect((await viewer.get(`/api/findings/${f.id}/verify`)).body.verification.status).toBe('intact');
    // Someone edits a frozen number in the SQLite file.
    const row = h.database.db.select().from(findingEvidence).where(eq(findingEvidence.findingId, f.id)).get()!;
    h.database.sqlite.prepare("update finding_evidence set snapshot = json_set(snapshot, '$.computedAt', '2000-01-01') where id = ?").run(row.id);
    const v = (await viewer.get(`/api/findings/${f.id}/verify`)).body.verification;
    expect(v.status).toBe('altered');
    expect(v.differences).toEqual(['finding: evidence[0].snapshot.computedAt', 'wiki page: evidence[0].snapshot.computedAt']);
  });
});
