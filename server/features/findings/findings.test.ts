import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, desc, eq, gt } from 'drizzle-orm';
import { startHarness, type Harness } from '../../testing/harness';
import { auditLog, outbox } from '../../db/schema/admin';
import { findings, signatures } from '../../db/schema/findings';
import { resins, species } from '../../db/schema/reference';
import { wikiPages } from '../../db/schema/wiki';
import { DEMO_PASSWORD } from '../../seed';
import { sha256Hex } from './signing';

type Agent = Awaited<ReturnType<Harness['signIn']>>;
type Role = 'admin' | 'reviewer' | 'technician' | 'viewer';
let h: Harness;
let as: Record<Role, Agent>;

const speciesId = (name: string) => h.database.db.select().from(species).where(eq(species.commonName, name)).get()!.id;
const firstResin = () => h.database.db.select().from(resins).get()!;

async function draft(agent: Agent = as.technician, extra: Record<string, unknown> = {}) {
  const res = await agent.post('/api/findings').send({
    title: 'Red maple takes more resin than yellow buckeye',
    bodyMd: 'Across the trial, **red maple** coupons gained more weight than the buckeye ones.',
    speciesIds: [speciesId('Maple, red')],
    resinIds: [firstResin().id],
    ...extra,
  });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.finding as { id: number; revision: number; state: string; actions: string[] };
}

async function inReview(agent: Agent = as.technician) {
  const f = await draft(agent);
  const res = await agent.post(`/api/findings/${f.id}/submit`);
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return f;
}

const mailsSince = (id: number) => h.database.db.select().from(outbox).where(gt(outbox.id, id)).all();
const lastMailId = () => h.database.db.select().from(outbox).orderBy(desc(outbox.id)).get()?.id ?? 0;

beforeAll(async () => {
  h = await startHarness();
  as = {
    admin: await h.signIn('admin@demo.test'),
    reviewer: await h.signIn('reviewer@demo.test'),
    technician: await h.signIn('tech@demo.test'),
    viewer: await h.signIn('viewer@demo.test'),
  };
});
afterAll(async () => {
  await h.close();
});

describe('the demo finding', () => {
  it('waits in review, by the demo technician, with the saved view as frozen evidence and the comparison in its words', async () => {
    const list = await as.reviewer.get('/api/findings?state=in-review&sort=savedAt');
    expect(list.status).toBe(200);
    const demo = (list.body.items as { id: number; title: string }[]).find((f) => f.title.startsWith('Dyed and clear blend'));
    expect(demo).toBeDefined();
    const res = await as.reviewer.get(`/api/findings/${demo!.id}`);
    const f = res.body.finding as {
      state: string;
      bodyMd: string;
      author: { name: string };
      evidence: { title: string; snapshot: Record<string, unknown> }[];
      actions: string[];
    };
    expect(f.state).toBe('in-review');
    expect(f.author.name).toMatch(/^Teo Brackett/);
    expect(f.evidence).toHaveLength(1);
    // The body quotes the sentence the saved view froze, so it claims nothing the demo numbers do not show.
    const frozen = f.evidence[0]!.snapshot as { numbers: { compare: { sentence: string } } };
    expect(f.bodyMd).toContain(frozen.numbers.compare.sentence);
    // The reviewer did not write it, so may approve or return it.
    expect(f.actions).toEqual(expect.arrayContaining(['approve', 'return', 'comment']));
  });
});

describe('findings: who may do what', () => {
  it('answers 401 without a session and 403 to a viewer writing', async () => {
    const anon = h.agent();
    expect((await anon.get('/api/findings')).status).toBe(401);
    expect((await anon.post('/api/findings').send({ title: 'x' })).status).toBe(401);
    expect((await as.viewer.post('/api/findings').send({ title: 'x' })).status).toBe(403);
    expect((await as.viewer.get('/api/findings')).status).toBe(200);
  });

  it('walks every transition for each role and for the author', async () => {
    // [action, from-state setup, role, expected status]
    const f = await draft();
    // Draft: only technicians and up edit; viewer 403; the reviewer cannot approve a draft (409).
    expect((await as.viewer.patch(`/api/findings/${f.id}`).send({ baseRevision: f.revision, title: 'v' })).status).toBe(403);
    expect((await as.reviewer.post(`/api/findings/${f.id}/approve`).send({ password: DEMO_PASSWORD, meaning: 'approved-for-wiki' })).status).toBe(409);
    expect((await as.reviewer.post(`/api/findings/${f.id}/return`).send({ reason: 'x' })).status).toBe(409);
    expect((await as.technician.post(`/api/findings/${f.id}/reopen`)).status).toBe(409);
    // Only the author (or an admin) withdraws.
    expect((await as.reviewer.post(`/api/findings/${f.id}/withdraw`)).status).toBe(403);
    // Submit: viewer 403, author 200; a second submit 409.
    expect((await as.viewer.post(`/api/findings/${f.id}/submit`)).status).toBe(403);
    expect((await as.technician.post(`/api/findings/${f.id}/submit`)).status).toBe(200);
    expect((await as.technician.post(`/api/findings/${f.id}/submit`)).status).toBe(409);
    // In review: no edits, no withdrawal; a technician may neither return nor approve.
    expect((await as.technician.patch(`/api/findings/${f.id}`).send({ baseRevision: f.revision, title: 'x' })).status).toBe(409);
    expect((await as.technician.post(`/api/findings/${f.id}/withdraw`)).status).toBe(409);
    expect((await as.technician.post(`/api/findings/${f.id}/return`).send({ reason: 'x' })).status).toBe(403);
    expect((await as.technician.post(`/api/findings/${f.id}/approve`).send({ password: DEMO_PASSWORD, meaning: 'approved-for-wiki' })).status).toBe(403);
    expect((await as.viewer.post(`/api/findings/${f.id}/comments`).send({ bodyMd: 'hi' })).status).toBe(403);
    // The reviewer returns it; the author reopens, edits, submits again; the reviewer approves.
    const ret = await as.reviewer.post(`/api/findings/${f.id}/return`).send({ reason: 'Add the number of coupons per species.' });
    expect(ret.status).toBe(200);
    expect(ret.body.finding.state).toBe('returned');
    expect((await as.reviewer.post(`/api/findings/${f.id}/reopen`)).status).toBe(403);
    expect((await as.technician.post(`/api/findings/${f.id}/reopen`)).body.finding.state).toBe('draft');
    const edited = await as.technician
      .patch(`/api/findings/${f.id}`)
      .send({ baseRevision: f.revision, bodyMd: 'Six coupons per species. Red maple gained more.' });
    expect(edited.status, JSON.stringify(edited.body)).toBe(200);
    expect((await as.technician.post(`/api/findings/${f.id}/submit`)).status).toBe(200);
    const ok = await as.reviewer.post(`/api/findings/${f.id}/approve`).send({ password: DEMO_PASSWORD, meaning: 'approved-for-wiki' });
    expect(ok.status, JSON.stringify(ok.body)).toBe(200);
    expect(ok.body.finding.state).toBe('approved');
    expect(ok.body.finding.wikiSlug).toMatch(/^red-maple-takes-more-resin-than-yellow-buckeye-\d+$/);
    // Approved: every change is 409, for every role.
    for (const role of ['technician', 'reviewer', 'admin'] as const) {
      expect((await as[role].patch(`/api/findings/${f.id}`).send({ baseRevision: 99, title: 'changed' })).status, role).toBe(409);
      expect((await as[role].post(`/api/findings/${f.id}/comments`).send({ bodyMd: 'late' })).status, role).toBe(409);
      expect((await as[role].post(`/api/findings/${f.id}/withdraw`)).status, role).toBe(409);
    }
    expect((await as.admin.post(`/api/findings/${f.id}/approve`).send({ password: DEMO_PASSWORD, meaning: 'approved-for-wiki' })).status).toBe(409);
  });

  it('lets the author withdraw a draft and a returned finding, and nothing afterwards', async () => {
    const a = await draft();
    expect((await as.technician.post(`/api/findings/${a.id}/withdraw`)).body.finding.state).toBe('withdrawn');
    expect((await as.technician.post(`/api/findings/${a.id}/submit`)).status).toBe(409);
    const b = await inReview();
    await as.reviewer.post(`/api/findings/${b.id}/return`).send({ reason: 'No.' });
    expect((await as.admin.post(`/api/findings/${b.id}/withdraw`)).body.finding.state).toBe('withdrawn');
  });

  it('refuses self-approval on the server, for the author and for anyone who edited the version', async () => {
    // A reviewer who wrote the finding cannot approve it, even though the role allows approving.
    const own = await inReview(as.reviewer);
    const self = await as.reviewer.post(`/api/findings/${own.id}/approve`).send({ password: DEMO_PASSWORD, meaning: 'approved-for-wiki' });
    expect(self.status).toBe(403);
    expect(self.body.error.message).toMatch(/someone else/);
    expect(h.database.db.select().from(signatures).where(eq(signatures.findingId, own.id)).get()).toBeUndefined();
    // The admin edits the technician's draft; then the admin may not approve, the reviewer may.
    const f = await draft();
    const edit = await as.admin.patch(`/api/findings/${f.id}`).send({ baseRevision: f.revision, title: 'Edited by the admin' });
    expect(edit.status).toBe(200);
    expect(edit.body.finding.editors.map((e: { name: string }) => e.name)).toContain('Wren Ashdown (owner)');
    await as.technician.post(`/api/findings/${f.id}/submit`);
    expect((await as.admin.post(`/api/findings/${f.id}/approve`).send({ password: DEMO_PASSWORD, meaning: 'approved-for-wiki' })).status).toBe(403);
    expect((await as.admin.post(`/api/findings/${f.id}/return`).send({ reason: 'x' })).status).toBe(403);
    expect((await as.reviewer.post(`/api/findings/${f.id}/approve`).send({ password: DEMO_PASSWORD, meaning: 'reviewed-no-objection' })).status).toBe(200);
  });

  it('refuses a wrong password, signs nothing and records the attempt', async () => {
    const f = await inReview();
    const res = await as.reviewer.post(`/api/findings/${f.id}/approve`).send({ password: 'not-my-password', meaning: 'approved-for-wiki' });
    expect(res.status).toBe(403);
    expect(res.body.error.fieldErrors.password).toBeDefined();
    expect(h.database.db.select().from(signatures).where(eq(signatures.findingId, f.id)).get()).toBeUndefined();
    expect(h.database.db.select().from(findings).where(eq(findings.id, f.id)).get()!.state).toBe('in-review');
    const refused = h.database.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.action, 'signature-refused'), eq(auditLog.entityId, String(f.id))))
      .all();
    expect(refused).toHaveLength(1);
  });

  it('refuses an autosave based on a stale revision (409) and keeps a version history', async () => {
    const f = await draft();
    const a = await as.technician.patch(`/api/findings/${f.id}`).send({ baseRevision: f.revision, bodyMd: 'first' });
    expect(a.body.finding.revision).toBe(1); // the author's quick saves fold into one revision
    const b = await as.admin.patch(`/api/findings/${f.id}`).send({ baseRevision: 1, bodyMd: 'second, by someone else' });
    expect(b.body.finding.revision).toBe(2);
    const stale = await as.technician.patch(`/api/findings/${f.id}`).send({ baseRevision: 1, bodyMd: 'third' });
    expect(stale.status).toBe(409);
    const hist = await as.viewer.get(`/api/findings/${f.id}/revisions`);
    expect(hist.body.items.map((r: { revision: number }) => r.revision)).toEqual([2, 1]);
    const r1 = await as.viewer.get(`/api/findings/${f.id}/revisions/1`);
    expect(r1.body.revision.bodyMd).toBe('first');
  });

  it('names the field when a linked record does not exist', async () => {
    const res = await as.technician.post('/api/findings').send({ title: 'x', speciesIds: [999999] });
    expect(res.status).toBe(400);
    expect(res.body.error.fieldErrors.speciesIds[0]).toMatch(/999999/);
  });
});

describe('findings: e-mail per transition', () => {
  it('mails every reviewer on submit, participants on a comment, the author on return and on approval, each with a link', async () => {
    let mark = lastMailId();
    const f = await inReview();
    let mails = mailsSince(mark);
    // The reviewer and the admin may review; the technician (the author) is not asked.
    expect(mails.map((m) => m.toAddress).sort()).toEqual(['admin@demo.test', 'reviewer@demo.test']);
    expect(mails[0]!.subject).toMatch(/^Review requested: /);
    expect(mails[0]!.textBody).toContain(`http://localhost:3999/findings/${f.id}`);

    mark = lastMailId();
    await as.reviewer.post(`/api/findings/${f.id}/comments`).send({ bodyMd: 'How many coupons per species?' });
    mails = mailsSince(mark);
    expect(mails.map((m) => m.toAddress)).toEqual(['tech@demo.test']);
    expect(mails[0]!.subject).toMatch(/^New comment on: /);
    expect(mails[0]!.textBody).toContain('How many coupons per species?');

    mark = lastMailId();
    await as.reviewer.post(`/api/findings/${f.id}/return`).send({ reason: 'Give the counts.' });
    mails = mailsSince(mark);
    expect(mails.map((m) => m.toAddress)).toEqual(['tech@demo.test']);
    expect(mails[0]!.subject).toMatch(/^Returned for changes: /);
    expect(mails[0]!.textBody).toContain('Give the counts.');
    expect(mails[0]!.textBody).toContain(`/findings/${f.id}`);

    await as.technician.post(`/api/findings/${f.id}/reopen`);
    await as.technician.post(`/api/findings/${f.id}/submit`);
    mark = lastMailId();
    const ok = await as.reviewer.post(`/api/findings/${f.id}/approve`).send({ password: DEMO_PASSWORD, meaning: 'approved-for-wiki' });
    mails = mailsSince(mark);
    expect(mails.map((m) => m.toAddress)).toEqual(['tech@demo.test']);
    expect(mails[0]!.subject).toMatch(/^Approved: /);
    expect(mails[0]!.textBody).toContain(`http://localhost:3999/wiki/${ok.body.finding.wikiSlug}`);
  });
});

describe('signatures', () => {
  it('stores who, the name as printed, when, the meaning and a SHA-256 of the canonical content', async () => {
    const f = await inReview();
    const res = await as.reviewer.post(`/api/findings/${f.id}/approve`).send({ password: DEMO_PASSWORD, meaning: 'reviewed-no-objection' });
    const sig = res.body.finding.signature;
    expect(sig).toMatchObject({
      signerName: 'Ilse Marrow (quality)',
      meaning: 'reviewed-no-objection',
      meaningLabel: 'Reviewed, no objection',
      algorithm: 'SHA-256',
    });
    expect(sig.contentHash).toMatch(/^[0-9a-f]{64}$/);
    const row = h.database.db.select().from(signatures).where(eq(signatures.findingId, f.id)).get()!;
    expect(sha256Hex(row.signedContent)).toBe(row.contentHash);
    expect(JSON.parse(row.signedContent).signature).toMatchObject({ signerName: 'Ilse Marrow (quality)', meaning: 'reviewed-no-objection' });
    const v = await as.viewer.get(`/api/findings/${f.id}/verify`);
    expect(v.body.verification).toMatchObject({ status: 'intact', differences: [] });
    expect(v.body.verification.pageHash).toBe(sig.contentHash);
  });

  it("detects a row changed behind the app's back, and says what differs", async () => {
    const f = await inReview();
    await as.reviewer.post(`/api/findings/${f.id}/approve`).send({ password: DEMO_PASSWORD, meaning: 'approved-for-wiki' });
    // Someone edits the SQLite file directly.
    h.database.sqlite.prepare('update findings set body_md = ? where id = ?').run('Buckeye took more resin.', f.id);
    let v = (await as.viewer.get(`/api/findings/${f.id}/verify`)).body.verification;
    expect(v.status).toBe('altered');
    expect(v.differences).toEqual(['finding: finding.bodyMd']);
    // And on the published page too.
    h.database.sqlite.prepare('update wiki_pages set title = ? where finding_id = ?').run('Another title', f.id);
    v = (await as.viewer.get(`/api/findings/${f.id}/verify`)).body.verification;
    expect(v.differences).toEqual(['finding: finding.bodyMd', 'wiki page: finding.title']);
    // Changing the signature's meaning afterwards breaks it as well.
    h.database.sqlite.prepare("update signatures set meaning = 'reviewed-no-objection' where finding_id = ?").run(f.id);
    v = (await as.viewer.get(`/api/findings/${f.id}/verify`)).body.verification;
    expect(v.differences).toContain('finding: signature.meaning');
  });

  it('rate-limits failed signing attempts like sign-in, across a restart', async () => {
    const limited = await startHarness({ signingLimit: 2 });
    try {
      const tech = await limited.signIn('tech@demo.test');
      const rev = await limited.signIn('reviewer@demo.test');
      const created = await tech.post('/api/findings').send({ title: 'Rate', bodyMd: 'Body' });
      await tech.post(`/api/findings/${created.body.finding.id}/submit`);
      const url = `/api/findings/${created.body.finding.id}/approve`;
      expect((await rev.post(url).send({ password: 'wrong-1', meaning: 'approved-for-wiki' })).status).toBe(403);
      expect((await rev.post(url).send({ password: 'wrong-2', meaning: 'approved-for-wiki' })).status).toBe(403);
      // The count is kept in SQLite, so a restart does not reset it.
      await limited.restart();
      const again = await limited.signIn('reviewer@demo.test');
      const third = await again.post(url).send({ password: DEMO_PASSWORD, meaning: 'approved-for-wiki' });
      expect(third.status).toBe(429);
      expect(third.body.error.code).toBe('rate_limited');
      expect(limited.database.db.select().from(signatures).all()).toHaveLength(0);
    } finally {
      await limited.close();
    }
  });
});

describe('new versions', () => {
  it('revises an approved finding as a new draft that, once approved, supersedes the old page', async () => {
    const f = await inReview();
    const first = (await as.reviewer.post(`/api/findings/${f.id}/approve`).send({ password: DEMO_PASSWORD, meaning: 'approved-for-wiki' })).body.finding;
    const v2 = await as.technician.post(`/api/findings/${f.id}/revise`);
    expect(v2.status).toBe(201);
    expect(v2.body.finding).toMatchObject({ version: 2, state: 'draft', seriesId: first.seriesId, previousVersion: { id: f.id, version: 1 } });
    expect((await as.technician.post(`/api/findings/${f.id}/revise`)).status).toBe(409);
    const id2 = v2.body.finding.id;
    await as.technician.patch(`/api/findings/${id2}`).send({ baseRevision: 1, bodyMd: 'Corrected: red maple gained more, by about a third.' });
    await as.technician.post(`/api/findings/${id2}/submit`);
    const second = (await as.reviewer.post(`/api/findings/${id2}/approve`).send({ password: DEMO_PASSWORD, meaning: 'approved-for-wiki' })).body.finding;
    expect(second.wikiSlug).toBe(`${first.wikiSlug}-v2`);
    const old = await as.viewer.get(`/api/wiki/${first.wikiSlug}`);
    expect(old.status).toBe(200);
    expect(old.body.page.supersededBy).toMatchObject({ slug: second.wikiSlug, version: 2 });
    const now = await as.viewer.get(`/api/wiki/${second.wikiSlug}`);
    expect(now.body.page.supersedes).toMatchObject({ slug: first.wikiSlug });
    // The old page is out of the index but still found when asked for.
    const list = await as.viewer.get('/api/wiki');
    expect(list.body.items.map((i: { slug: string }) => i.slug)).not.toContain(first.wikiSlug);
    const all = await as.viewer.get('/api/wiki?includeSuperseded=true');
    expect(all.body.items.map((i: { slug: string }) => i.slug)).toContain(first.wikiSlug);
    expect(h.database.db.select().from(wikiPages).where(eq(wikiPages.seriesId, first.seriesId)).all()).toHaveLength(2);
  });
});
