import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { and, eq, isNull } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { startHarness, type Harness, type HarnessOptions } from '../../testing/harness';
import { drizzle } from 'drizzle-orm/better-sqlite3';
import { openSecondConnection, schema } from '../../db/client';
import { createMeasurements } from '../../measurements/measurements';
import { markStaleJobsFailed } from './imports.repo';
import { refreshResults } from '../../measurements/results';
import { auditLog } from '../../db/schema/admin';
import { coupons, weighings } from '../../db/schema/coupons';
import { species } from '../../db/schema/reference';
import type { ImportDetail, ImportMappingInput, ImportProblem } from '../../../shared/schemas/imports';
import { MAX_IMPORT_BYTES } from '../../../shared/constants/imports';

type Agent = Awaited<ReturnType<Harness['signIn']>>;
const FIXTURES = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../../tests/fixtures/imports');
const fixture = (name: string) => fs.readFileSync(path.join(FIXTURES, name));

/** A fresh shop (the demo data) with treated coupons FX-01…FX-06 and a control FX-C1, as the fixtures expect. */
async function shop(options: HarnessOptions = {}) {
  const h = await startHarness(options);
  const tech = await h.signIn('tech@demo.test');
  const viewer = await h.signIn('viewer@demo.test');
  const sp = h.database.db
    .select()
    .from(species)
    .all()
    .find((s) => s.basicSg !== null)!;
  const ids: Record<string, number> = {};
  for (const tag of ['FX-01', 'FX-02', 'FX-03', 'FX-04', 'FX-05', 'FX-06', 'FX-C1']) {
    const res = await tech.post('/api/coupons').send({ tag, speciesId: sp.id, role: tag === 'FX-C1' ? 'control' : 'treated' });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    ids[tag] = res.body.coupon.id;
  }
  return { h, tech, viewer, ids };
}

async function upload(agent: Agent, name: string, bytes: Buffer = fixture(name)) {
  return agent.post('/api/imports').attach('file', bytes, name);
}

/** Polls the import, as the client does, until its job has finished. */
async function settle(agent: Agent, id: number): Promise<ImportDetail> {
  for (;;) {
    // Held by the server until the job ends (or 2 s), as the client's poll is.
    const res = await agent.get(`/api/imports/${id}?wait=2000`);
    expect(res.status).toBe(200);
    if (res.body.status !== 'previewing' && res.body.status !== 'committing' && res.body.status !== 'undoing') return res.body;
  }
}

function mappingFor(d: ImportDetail, over: Partial<ImportMappingInput> = {}): ImportMappingInput {
  const s = d.detected.suggested;
  return {
    format: {
      encoding: d.detected.encoding.value,
      delimiter: d.detected.delimiter.value,
      hasHeader: d.detected.hasHeader.value,
      decimal: d.detected.decimal.value,
      dateOrder: d.detected.dateOrder.value,
    },
    target: { mode: 'tag', tagColumn: s.tagColumn ?? 0 },
    massColumn: s.massColumn ?? 1,
    unitColumn: s.unitColumn,
    dateColumn: s.dateColumn,
    timeColumn: s.timeColumn,
    stabilityColumn: s.stabilityColumn,
    stage: 'dry',
    ...over,
  };
}

async function previewed(agent: Agent, d: ImportDetail, over: Partial<ImportMappingInput> = {}) {
  const res = await agent.post(`/api/imports/${d.id}/preview`).send({ mapping: mappingFor(d, over) });
  expect(res.status, JSON.stringify(res.body)).toBe(202);
  const done = await settle(agent, d.id);
  expect(done.status, done.error ?? '').toBe('previewed');
  const problems = (await agent.get(`/api/imports/${d.id}/problems?pageSize=500`)).body.items as ImportProblem[];
  return { done, problems };
}

async function committed(agent: Agent, d: ImportDetail, over: Partial<ImportMappingInput> = {}, extra: Record<string, unknown> = {}) {
  const res = await agent.post(`/api/imports/${d.id}/commit`).send({ mapping: mappingFor(d, over), ...extra });
  expect(res.status, JSON.stringify(res.body)).toBe(202);
  return settle(agent, d.id);
}

/** Whether the commit of this import judged its readings again, from the app's log (written once the commit ended). */
async function judgedAgainIn(lines: string[], id: number): Promise<boolean | null> {
  const entry = () =>
    lines
      .map((l) => JSON.parse(l) as { msg: string; importId?: number; judgedAgain?: boolean | null })
      .find((l) => l.msg === 'import commit written' && l.importId === id);
  await vi.waitFor(() => expect(entry()).toBeDefined(), { timeout: 30_000, interval: 20 });
  return entry()!.judgedAgain ?? null;
}

const currentOf = (h: Harness, couponId: number) =>
  h.database.db
    .select()
    .from(weighings)
    .where(and(eq(weighings.couponId, couponId), isNull(weighings.supersededBy), isNull(weighings.deletedAt)))
    .all();

describe('imports: upload, detect, preview, commit, undo', () => {
  let s: Awaited<ReturnType<typeof shop>>;
  beforeAll(async () => {
    s = await shop();
  });
  afterAll(async () => {
    await s.h.close();
  });

  it('keeps the file under DATA_DIR by its SHA-256 and answers what it detected', async () => {
    const bytes = fixture('comma-header.csv');
    const res = await upload(s.tech, 'comma-header.csv');
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const sha = crypto.createHash('sha256').update(bytes).digest('hex');
    expect(res.body).toMatchObject({ originalName: 'comma-header.csv', sha256: sha, bytes: bytes.length, status: 'uploaded' });
    expect(fs.readFileSync(path.join(s.h.dir, 'imports', `${sha}.upload`)).equals(bytes)).toBe(true);
    expect(res.body.detected.delimiter.value).toBe(',');
    expect(res.body.columns.map((c: { name: string }) => c.name)).toEqual(['tag', 'mass', 'unit', 'date', 'time']);
    expect(res.body.sampleRows[0]).toEqual(['FX-01', '12.345', 'g', '2026-03-02', '09:15:00']);
    expect(res.body.detected.suggested).toMatchObject({ tagColumn: 0, massColumn: 1, unitColumn: 2, dateColumn: 3, timeColumn: 4 });
  });

  it('decodes UTF-16 and Windows-1252 files on the server', async () => {
    const le = (await upload(s.tech, 'utf16le-bom-tab.txt')).body;
    expect(le.detected.encoding.value).toBe('utf-16le');
    expect(le.sampleRows[0]).toEqual(['FX-01', '12.345', 'g']);
    const w = (await upload(s.tech, 'windows-1252-semicolon.csv')).body;
    expect(w.columns[0].name).toBe('Étiquette');
    expect(w.sampleRows[2][3]).toBe('coût €0');
  });

  it('commits the accepted rows through the measurements module, each weighing naming its import, then undoes', async () => {
    const d = (await upload(s.tech, 'utf8-bom-semicolon-decimal-comma.csv')).body as ImportDetail;
    expect(d.detected.dateOrder).toMatchObject({ value: 'dmy', assumed: false });
    const { done } = await previewed(s.tech, d, { utcOffsetMinutes: 60 });
    expect(done.counts).toEqual({ rows: 3, accepted: 3, corrections: 0, skipped: 0, problems: 0 });
    expect(done.previewRows.map((r) => [r.tag, r.massG, r.measuredAt])).toEqual([
      ['FX-01', 12.345, '2026-03-02T08:15:00.000Z'],
      ['FX-02', 11.902, '2026-03-02T08:16:10.000Z'],
      ['FX-03', 13.118, '2026-03-14T08:17:25.000Z'],
    ]);
    // Preview writes no weighing.
    expect(currentOf(s.h, s.ids['FX-01']!)).toEqual([]);

    const c = await committed(s.tech, d, { utcOffsetMinutes: 60 });
    expect(c.status, c.error ?? '').toBe('committed');
    const w = currentOf(s.h, s.ids['FX-01']!);
    expect(w).toHaveLength(1);
    expect(w[0]).toMatchObject({ stage: 'dry', massG: 12.345, importId: d.id, source: `import:${d.id}` });
    const coupon = (await s.tech.get(`/api/coupons/${s.ids['FX-02']}`)).body.coupon;
    expect(coupon.weighings.map((x: { massG: number; importId: number }) => [x.massG, x.importId])).toEqual([[11.902, d.id]]);

    // One audit entry for the rows (counts, stage, the ids it wrote) and one for the commit (file, hash),
    // not one per coupon; the coupon's history shows the commit beside the weighing that names the import.
    const importAudit = s.h.database.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'import'), eq(auditLog.entityId, String(d.id))))
      .all();
    expect(importAudit.map((e) => e.action)).toEqual(['upload', 'add-readings', 'commit']);
    const ids = s.h.database.db
      .select({ id: weighings.id })
      .from(weighings)
      .where(eq(weighings.importId, d.id))
      .all()
      .map((x) => x.id);
    expect(importAudit[1]!.after).toMatchObject({
      coupons: 3,
      weighings: 3,
      checks: 0,
      stages: { dry: 3 },
      weighingIds: { first: Math.min(...ids), last: Math.max(...ids) },
    });
    expect(importAudit[2]!.after).toMatchObject({ sha256: d.sha256, file: d.originalName, stage: 'dry' });
    expect(
      s.h.database.db
        .select()
        .from(auditLog)
        .where(and(eq(auditLog.action, 'add-readings'), eq(auditLog.entity, 'coupon')))
        .all(),
    ).toEqual([]);
    const history = (await s.viewer.get(`/api/coupons/${s.ids['FX-01']}/history`)).body;
    expect(history.audit.map((e: { action: string; entity: string }) => `${e.action}:${e.entity}`)).toContain('commit:import');

    const list = (await s.viewer.get('/api/imports')).body;
    expect(list.items.find((i: { id: number }) => i.id === d.id)).toMatchObject({ status: 'committed', stage: 'dry', createdByName: expect.any(String) });

    expect((await s.tech.post(`/api/imports/${d.id}/undo`).send({})).status).toBe(400);
    const started = await s.tech.post(`/api/imports/${d.id}/undo`).send({ reason: 'wrong stage picked' });
    expect(started.status, JSON.stringify(started.body)).toBe(202);
    const u = { body: await settle(s.tech, d.id) };
    expect(u.body).toMatchObject({ status: 'undone', undoReason: 'wrong stage picked', undoneByName: expect.any(String) });
    expect(currentOf(s.h, s.ids['FX-01']!)).toEqual([]);
    // Superseded, never deleted: the rows stay, marked, and the audit says who and why.
    const kept = s.h.database.db.select().from(weighings).where(eq(weighings.importId, d.id)).all();
    expect(kept).toHaveLength(3);
    expect(kept.every((k) => k.deletedAt !== null)).toBe(true);
    const audit = s.h.database.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'import'), eq(auditLog.entityId, String(d.id)), eq(auditLog.action, 'undo')))
      .get();
    expect(audit).toMatchObject({ reason: 'wrong stage picked' });
    expect((await s.tech.post(`/api/imports/${d.id}/undo`).send({ reason: 'again' })).status).toBe(409);
  });

  it('refuses a file imported before, naming that import, unless asked to import it again', async () => {
    const first = (await upload(s.tech, 'pipe-delimited.txt')).body as ImportDetail;
    expect((await committed(s.tech, first, { stage: 'wet-test', fixedUnit: 'oz' })).status).toBe('committed');
    const second = (await upload(s.tech, 'pipe-delimited.txt')).body as ImportDetail;
    expect(second.sameFile.map((x) => x.id)).toEqual([first.id]);
    const refused = await s.tech.post(`/api/imports/${second.id}/commit`).send({ mapping: mappingFor(second, { stage: 'wet-test' }) });
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toContain(`import ${first.id}`);
    const again = await committed(s.tech, second, { stage: 'wet-test' }, { again: true });
    expect(again.status).toBe('committed');
    // Every row already has its wet-test reading: skipped and said so, nothing doubled.
    expect(again.counts).toMatchObject({ accepted: 0, skipped: 3 });
    expect(currentOf(s.h, s.ids['FX-01']!).filter((x) => x.stage === 'wet-test')).toHaveLength(1);
    // 1 oz = 28.349523125 g (NIST SP 811 App. B): 0.4355 oz.
    expect(currentOf(s.h, s.ids['FX-01']!).find((x) => x.stage === 'wet-test')!.massG).toBeCloseTo(0.4355 * 28.349523125, 9);
  });

  it('commits a big file a slice at a time, in one transaction', async () => {
    const sp = s.h.database.db.select().from(species).limit(1).get()!;
    for (const tag of ['WW-01', 'WW-02']) expect((await s.tech.post('/api/coupons').send({ tag, speciesId: sp.id, role: 'treated' })).status).toBe(201);
    // 40,000 rows, each coupon weighed again and again.
    const lines = ['tag,mass', ...Array.from({ length: 40_000 }, (_, i) => `WW-0${(i % 2) + 1},${(10 + i / 100_000).toFixed(5)}`)];
    const d = (await upload(s.tech, 'big-repeats.csv', Buffer.from(`${lines.join('\r\n')}\r\n`))).body as ImportDetail;
    expect(d.bytes).toBeGreaterThan(256 * 1024);
    const { done } = await previewed(s.tech, d);
    expect(done.counts).toMatchObject({ rows: 40_000, accepted: 2, skipped: 39_998, problems: 0 });
    const c = await committed(s.tech, d);
    expect(c.status, c.error ?? '').toBe('committed');
    const written = s.h.database.db.select().from(weighings).where(eq(weighings.importId, d.id)).all();
    // The later reading of each coupon is kept: rows 40,000 and 40,001 of the file (the header is row 1).
    expect(written.map((w) => w.massG).sort()).toEqual([10.39998, 10.39999]);
  });

  it('holds a poll of a busy import until its job ends, when asked to wait', async () => {
    const sp = s.h.database.db.select().from(species).limit(1).get()!;
    expect((await s.tech.post('/api/coupons').send({ tag: 'LP-01', speciesId: sp.id, role: 'treated' })).status).toBe(201);
    const lines = ['tag,mass', ...Array.from({ length: 20_000 }, (_, i) => `LP-01,${(10 + i / 100_000).toFixed(5)}`)];
    const d = (await upload(s.tech, 'long-poll.csv', Buffer.from(`${lines.join('\n')}\n`))).body as ImportDetail;
    expect((await s.tech.post(`/api/imports/${d.id}/preview`).send({ mapping: mappingFor(d) })).status).toBe(202);
    // Asked first with a wait (the cap is generous: a preview of this file ends long before on any machine),
    // then without one. When the second still saw the preview running, the first can only have answered
    // after it: it waited for the end.
    const waited = s.tech.get(`/api/imports/${d.id}?wait=10000`).then((r) => r);
    const meanwhile = await s.tech.get(`/api/imports/${d.id}`);
    expect(['previewing', 'previewed']).toContain(meanwhile.body.status);
    const res = await waited;
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ status: 'previewed', progress: 1 });
    expect(res.body.counts).toMatchObject({ rows: 20_000, accepted: 1 });
    // Nothing runs now: answered as it stands.
    expect((await s.tech.get(`/api/imports/${d.id}?wait=10000`)).body.status).toBe('previewed');
    for (const wait of ['-1', '10001', 'soon']) {
      const bad = await s.tech.get(`/api/imports/${d.id}?wait=${wait}`);
      expect(bad.status).toBe(400);
      expect(bad.body.error.fieldErrors.wait).toBeDefined();
    }
  });

  it('keeps serving while another connection writes: reads answer, writes are told to try again, a commit waits its turn', async () => {
    const d = (await upload(s.tech, 'two-date-columns-day-first.csv')).body as ImportDetail;
    await previewed(s.tech, d, { stage: 'soaked' });
    const mapping = mappingFor(d, { stage: 'soaked' });
    // A second connection holding the write lock, as an import's commit does while it writes.
    const other = openSecondConnection(s.h.database.sqlite.name);
    try {
      other.exec('BEGIN IMMEDIATE');
      expect((await s.tech.get(`/api/coupons/${s.ids['FX-04']}`)).status).toBe(200);
      const write = await s.tech.post(`/api/coupons/${s.ids['FX-04']}/weighings`).send({ stage: 'dry', massG: 12.5, measuredAt: '2026-03-01T08:00:00.000Z' });
      expect(write.status).toBe(503);
      expect(write.headers['retry-after']).toBe('3');
      expect(write.body.error.message).toMatch(/import is being written.*Try again in a moment/);
      expect((await s.tech.post(`/api/imports/${d.id}/commit`).send({ mapping })).status).toBe(503);
      other.exec('COMMIT');

      // The commit starts; the other connection takes the lock again at once. Whichever gets it first, the
      // other waits its turn: the commit retries without sleeping the thread, and this connection (whose
      // busy timeout is 0) finds it taken while the commit writes. (A file this small is usually written
      // before the answer arrives; then the lock is simply free.)
      expect((await s.tech.post(`/api/imports/${d.id}/commit`).send({ mapping })).status).toBe(202);
      let held = false;
      try {
        other.exec('BEGIN IMMEDIATE');
        held = true;
      } catch (e) {
        expect((e as { code?: string }).code).toMatch(/^SQLITE_BUSY/);
      }
      if (held) {
        await new Promise((r) => setTimeout(r, 300));
        other.exec('COMMIT');
      }
    } finally {
      if (other.inTransaction) other.exec('ROLLBACK');
      other.close();
    }
    expect((await settle(s.tech, d.id)).status).toBe('committed');
    expect(
      (await s.tech.post(`/api/coupons/${s.ids['FX-04']}/weighings`).send({ stage: 'dry', massG: 12.5, measuredAt: '2026-03-01T08:00:00.000Z' })).status,
    ).toBe(201);
  });
});

describe('imports: every problem class explained by row and column', () => {
  let s: Awaited<ReturnType<typeof shop>>;
  const logLines: string[] = [];
  beforeAll(async () => {
    s = await shop({ logLines });
    // FX-01 has a dry mass above what the file says it weighed soaked: impossible.
    expect(
      (await s.tech.post(`/api/coupons/${s.ids['FX-01']}/weighings`).send({ stage: 'dry', massG: 12.5, measuredAt: '2026-03-01T08:00:00.000Z' })).status,
    ).toBe(201);
  });
  afterAll(async () => {
    await s.h.close();
  });

  it('lists each problem with its row, column and reason, and counts the outcomes', async () => {
    const d = (await upload(s.tech, 'problems.csv')).body as ImportDetail;
    const { done, problems } = await previewed(s.tech, d, { stage: 'soaked', unitColumn: 2 });
    const seen = problems.map((p) => [p.row, p.code, p.column, p.outcome]);
    expect(seen).toEqual([
      [2, 'unknown-tag', 'tag', 'problem'],
      [3, 'mass-not-a-number', 'mass', 'problem'],
      [4, 'mass-empty', 'mass', 'problem'],
      [5, 'unknown-unit', 'unit', 'problem'],
      [6, 'unstable', 'mass', 'skipped'],
      [7, 'non-positive-mass', 'mass', 'problem'],
      [8, 'non-positive-mass', 'mass', 'problem'],
      [9, 'duplicate-in-file', null, 'skipped'],
      [10, 'impossible-mass', 'mass', 'problem'],
      [11, 'control-at-resin-stage', null, 'problem'],
      [12, 'no-tag', 'tag', 'problem'],
    ]);
    expect(problems[0]!.suggestions).toContain('FX-01');
    expect(problems[0]!.message).toMatch(/did you mean FX-01/);
    expect(problems.find((p) => p.row === 10)!.message).toMatch(/below the dry mass/);
    expect(problems.find((p) => p.row === 9)!.message).toMatch(/row 10/);
    expect(done.counts).toEqual({ rows: 11, accepted: 0, corrections: 0, skipped: 2, problems: 9 });
  });

  it('judges again at commit: a coupon weighed between the preview and the commit is skipped, the rest written', async () => {
    const sp = s.h.database.db.select().from(species).limit(1).get()!;
    const ids: number[] = [];
    for (const tag of ['LT-01', 'LT-02']) ids.push((await s.tech.post('/api/coupons').send({ tag, speciesId: sp.id, role: 'treated' })).body.coupon.id);
    const d = (await upload(s.tech, 'late.csv', Buffer.from('tag,mass\r\nLT-01,10.5\r\nLT-02,11.25\r\n'))).body as ImportDetail;
    const { done } = await previewed(s.tech, d, { stage: 'dry' });
    expect(done.counts).toMatchObject({ rows: 2, accepted: 2, skipped: 0, problems: 0 });
    // Someone weighs LT-01 on the coupon page meanwhile.
    await s.tech.post(`/api/coupons/${ids[0]}/weighings`).send({ stage: 'dry', massG: 10.4, measuredAt: '2026-03-02T08:00:00.000Z' }).expect(201);
    const c = await committed(s.tech, d, { stage: 'dry' });
    expect(c.status, c.error ?? '').toBe('committed');
    expect(c.counts).toMatchObject({ rows: 2, accepted: 1, skipped: 1, problems: 0 });
    expect(currentOf(s.h, ids[0]!).map((w) => [w.massG, w.importId])).toEqual([[10.4, null]]);
    expect(currentOf(s.h, ids[1]!).map((w) => [w.massG, w.importId])).toEqual([[11.25, d.id]]);
    const problems = (await s.tech.get(`/api/imports/${d.id}/problems`)).body.items as ImportProblem[];
    expect(problems.map((p) => [p.row, p.code, p.outcome])).toEqual([[2, 'existing-reading', 'skipped']]);
    expect(await judgedAgainIn(logLines, d.id)).toBe(true);
  });

  it("writes the preview's accepted rows without judging them again when nothing was written since", async () => {
    const sp = s.h.database.db.select().from(species).limit(1).get()!;
    const ids: number[] = [];
    for (const tag of ['UC-01', 'UC-02']) ids.push((await s.tech.post('/api/coupons').send({ tag, speciesId: sp.id, role: 'treated' })).body.coupon.id);
    const d = (await upload(s.tech, 'unchanged.csv', Buffer.from('tag,mass\r\nUC-01,10.5\r\nUC-02,11.25\r\n'))).body as ImportDetail;
    const { done } = await previewed(s.tech, d, { stage: 'dry' });
    expect(done.counts).toMatchObject({ rows: 2, accepted: 2, skipped: 0, problems: 0 });
    const c = await committed(s.tech, d, { stage: 'dry' });
    expect(c.status, c.error ?? '').toBe('committed');
    expect(c.counts).toMatchObject({ rows: 2, accepted: 2, skipped: 0, problems: 0 });
    expect(await judgedAgainIn(logLines, d.id)).toBe(false);
    expect(ids.map((id) => currentOf(s.h, id).map((w) => [w.massG, w.importId]))).toEqual([[[10.5, d.id]], [[11.25, d.id]]]);
  });

  it('judges again when another connection wrote between the preview and the commit, and reports the new problem', async () => {
    const sp = s.h.database.db.select().from(species).limit(1).get()!;
    const ids: number[] = [];
    for (const tag of ['OC-01', 'OC-02']) ids.push((await s.tech.post('/api/coupons').send({ tag, speciesId: sp.id, role: 'treated' })).body.coupon.id);
    // OC-02 already weighs 20 g dry, so a soaked reading of 21 g is possible at the preview.
    await s.tech.post(`/api/coupons/${ids[1]}/weighings`).send({ stage: 'dry', massG: 20, measuredAt: '2026-03-02T08:00:00.000Z' }).expect(201);
    const d = (await upload(s.tech, 'other.csv', Buffer.from('tag,mass\r\nOC-01,10.5\r\nOC-02,21\r\n'))).body as ImportDetail;
    const { done } = await previewed(s.tech, d, { stage: 'soaked' });
    expect(done.counts).toMatchObject({ rows: 2, accepted: 2, problems: 0 });
    // A second connection (as an import's commit uses) corrects OC-02's dry mass above 21 g meanwhile.
    const other = openSecondConnection(s.h.database.sqlite.name);
    try {
      const dryId = currentOf(s.h, ids[1]!)[0]!.id;
      const odb = drizzle(other, { schema });
      const actor = { id: (await s.tech.get('/api/auth/me')).body.user.id as number };
      odb.transaction((tx) => createMeasurements({ now: () => new Date() }).correctWeighing(tx, actor, dryId, { massG: 22, reason: 'misread' }));
    } finally {
      other.close();
    }
    const c = await committed(s.tech, d, { stage: 'soaked' });
    expect(c.status, c.error ?? '').toBe('committed');
    expect(c.counts).toMatchObject({ rows: 2, accepted: 1, problems: 1 });
    expect(await judgedAgainIn(logLines, d.id)).toBe(true);
    const problems = (await s.tech.get(`/api/imports/${d.id}/problems`)).body.items as ImportProblem[];
    expect(problems.map((p) => [p.row, p.code, p.column, p.outcome])).toEqual([[3, 'impossible-mass', 'mass', 'problem']]);
    expect(currentOf(s.h, ids[1]!).map((w) => [w.stage, w.massG])).toEqual([['dry', 22]]);
  });

  it('writes nothing under all-or-nothing while problems remain, and says why', async () => {
    const d = (await upload(s.tech, 'problems.csv')).body as ImportDetail;
    const c = await committed(s.tech, d, { stage: 'dry', unitColumn: 2 }, { choice: 'all-or-nothing' });
    expect(c.status).toBe('previewed');
    expect(c.error).toMatch(/nothing was imported/);
    expect(s.h.database.db.select().from(weighings).where(eq(weighings.importId, d.id)).all()).toEqual([]);
  });

  it('skips or corrects a coupon that already has the reading, and undo restores the old value', async () => {
    const d = (await upload(s.tech, 'no-header.csv')).body as ImportDetail;
    const skip = await previewed(s.tech, d, { stage: 'dry' });
    expect(skip.problems.map((p) => [p.row, p.code, p.outcome])).toEqual([[1, 'existing-reading', 'skipped']]);
    expect(skip.problems[0]!.message).toMatch(/already has a dry weighing/);
    expect((await s.tech.post(`/api/imports/${d.id}/preview`).send({ mapping: mappingFor(d, { existing: 'correct' }) })).status).toBe(400);
    const c = await committed(s.tech, d, { existing: 'correct', correctionReason: 'the balance was recalibrated' });
    expect(c.status, c.error ?? '').toBe('committed');
    expect(c.counts).toMatchObject({ accepted: 2, corrections: 1 });
    expect(currentOf(s.h, s.ids['FX-01']!).map((w) => w.massG)).toEqual([12.345]);
    await s.tech.post(`/api/imports/${d.id}/undo`).send({ reason: 'wrong file' }).expect(202);
    expect((await settle(s.tech, d.id)).status).toBe('undone');
    expect(currentOf(s.h, s.ids['FX-01']!).map((w) => w.massG)).toEqual([12.5]);
    expect(currentOf(s.h, s.ids['FX-02']!)).toEqual([]);
  });

  it('assigns readings in weighing order in sequence mode and says when the counts differ', async () => {
    const d = (await upload(s.tech, 'sequence-readings.txt')).body as ImportDetail;
    expect(d.detected.hasHeader.value).toBe(false);
    const runCoupons = (await s.tech.get('/api/coupons?runId=4&pageSize=200')).body.items as { id: number; tag: string }[];
    expect(runCoupons.length).toBeGreaterThanOrEqual(3);
    const ids = runCoupons.map((c) => c.id);
    const base = { massColumn: 0, stage: 'dry' as const };
    const few = await previewed(s.tech, d, { ...base, target: { mode: 'sequence', runId: 4, couponIds: ids.slice(0, 2) } });
    expect(few.problems.map((p) => [p.row, p.code])).toEqual([[3, 'sequence-extra-reading']]);
    const many = await previewed(s.tech, d, { ...base, target: { mode: 'sequence', runId: 4, couponIds: [...ids.slice(0, 3), s.ids['FX-04']!] } });
    expect(many.problems.map((p) => [p.row, p.code])).toEqual([[0, 'sequence-missing-reading']]);
    expect(many.problems[0]!.message).toMatch(/FX-04/);
    const order = [ids[2]!, ids[0]!, ids[1]!];
    const exact = await previewed(s.tech, d, { ...base, target: { mode: 'sequence', runId: 4, couponIds: order } });
    expect(exact.done.previewRows.map((r) => [r.couponId, r.massG])).toEqual([
      [order[0], 12.345],
      [order[1], 11.902],
      [order[2], 13.118],
    ]);
  });

  it('keeps formula-like and HTML cells as inert text and neutralises them in the CSV of problems', async () => {
    const d = (await upload(s.tech, 'formula-cells.csv')).body as ImportDetail;
    expect(d.sampleRows[0]![2]).toBe('=HYPERLINK("http://example.invalid","x")');
    const { problems } = await previewed(s.tech, d, { stage: 'wet-test' });
    expect(problems.find((p) => p.code === 'unknown-tag')!.cells[0]).toBe('@SUM(A1:A2)');
    const csv = await s.viewer.get(`/api/imports/${d.id}/problems.csv`);
    expect(csv.status).toBe(200);
    expect(csv.headers['content-type']).toMatch(/text\/csv/);
    expect(csv.text).toContain("'@SUM(A1:A2)");
    const h = (await upload(s.tech, 'html-in-cell.csv')).body as ImportDetail;
    const hp = await previewed(s.tech, h, { stage: 'wet-test' });
    expect(hp.problems[0]!.message).toContain('<img src=x onerror=alert(1)>');
    expect(hp.problems.map((p) => p.code)).toEqual(['unknown-tag', 'mass-not-a-number']);
  });

  it('saves a mapping as a preset and offers it for the next file of the same shape', async () => {
    const d = (await upload(s.tech, 'stability-column.csv')).body as ImportDetail;
    const res = await s.tech.post('/api/imports/presets').send({ name: 'Bench balance', importId: d.id, mapping: mappingFor(d, { stage: 'drying-check' }) });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect((await s.tech.post('/api/imports/presets').send({ name: 'Bench balance', importId: d.id, mapping: mappingFor(d) })).status).toBe(409);
    const next = (await upload(s.tech, 'stability-column.csv', Buffer.from('Sample,Weight,Stable\nFX-03,13.2,ST\n'))).body as ImportDetail;
    expect(next.presets.map((p) => p.name)).toEqual(['Bench balance']);
    expect(next.presets[0]!.mapping.stage).toBe('drying-check');
    const other = (await upload(s.tech, 'comma-header.csv')).body as ImportDetail;
    expect(other.presets).toEqual([]);
  });

  it('offers a template CSV', async () => {
    const res = await s.viewer.get('/api/imports/template.csv');
    expect(res.status).toBe(200);
    expect(res.headers['content-disposition']).toMatch(/attachment/);
    expect(res.text.split('\r\n')[0]).toBe('tag,mass,unit,date,time,stable');
  });
});

describe('imports: files refused with a clear answer, nothing left behind', () => {
  let s: Awaited<ReturnType<typeof shop>>;
  beforeAll(async () => {
    s = await shop();
  });
  afterAll(async () => {
    await s.h.close();
  });
  const leftovers = () => (fs.existsSync(path.join(s.h.dir, 'imports')) ? fs.readdirSync(path.join(s.h.dir, 'imports')) : []);

  it.each([
    ['binary.csv', 422, /PNG image/],
    ['empty.csv', 422, /empty/],
    ['header-only.csv', 422, /no readings/],
    ['long-line.csv', 422, /longer than 64 KB/],
  ])('%s → %i', async (name, status, message) => {
    const res = await upload(s.tech, name);
    expect(res.status).toBe(status);
    expect(res.body.error.message).toMatch(message);
    expect(res.body.error.fieldErrors.file).toBeDefined();
    expect(leftovers()).toEqual([]);
  });

  it('refuses another extension', async () => {
    const res = await upload(s.tech, 'readings.xlsx', fixture('comma-header.csv'));
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/not a \.csv, \.txt or \.tsv/);
    expect(leftovers()).toEqual([]);
  });

  it('answers 413 for 50 MB and one byte, and keeps no part of it', async () => {
    const big = Buffer.alloc(MAX_IMPORT_BYTES + 1, 0x31);
    const res = await upload(s.tech, 'big.csv', big);
    expect(res.status).toBe(413);
    expect(res.body.error.message).toMatch(/larger than the 50 MB limit/);
    expect(leftovers()).toEqual([]);
  });

  it('leaves no weighing when the database fails in the middle of a commit', async () => {
    const d = (await upload(s.tech, 'comma-header.csv')).body as ImportDetail;
    // A real failure inside SQLite on the second row's insert, not a mock.
    s.h.database.sqlite.exec(
      "create trigger fail_mid_import before insert on weighings when new.mass_g = 11.902 begin select raise(abort, 'disk trouble'); end",
    );
    try {
      const c = await committed(s.tech, d);
      expect(c.status).toBe('failed');
      expect(c.error).toMatch(/nothing was imported/);
    } finally {
      s.h.database.sqlite.exec('drop trigger fail_mid_import');
    }
    expect(s.h.database.db.select().from(weighings).where(eq(weighings.importId, d.id)).all()).toEqual([]);
    expect(currentOf(s.h, s.ids['FX-01']!)).toEqual([]);
    const again = await committed(s.tech, d);
    expect(again.status).toBe('committed');
  });

  it('leaves nothing when the database fails after several slices of a big commit, and keeps answering meanwhile', async () => {
    // 6,000 new coupons through the app's own path for many at once (their results rows included).
    const sp = s.h.database.db.select().from(species).limit(1).get()!;
    const tags = Array.from({ length: 6_000 }, (_, i) => `SL-${String(i).padStart(4, '0')}`);
    const ins = s.h.database.sqlite.prepare("insert into coupons (tag, species_id, role) values (?, ?, 'treated')");
    s.h.database.db.transaction((tx) =>
      refreshResults(
        tx,
        tags.map((t) => Number(ins.run(t, sp.id).lastInsertRowid)),
      ),
    );
    const lines = ['tag,mass', ...tags.map((t, i) => `${t},${(12 + i / 10_000).toFixed(4)}`)];
    const d = (await upload(s.tech, 'slices.csv', Buffer.from(`${lines.join('\n')}\n`))).body as ImportDetail;
    const { done } = await previewed(s.tech, d);
    expect(done.counts).toMatchObject({ rows: 6_000, accepted: 6_000, problems: 0 });
    // The last row's insert fails inside SQLite, after two slices of 2,000 were written and the event loop had turns.
    s.h.database.sqlite.exec("create trigger fail_late before insert on weighings when new.mass_g = 12.5999 begin select raise(abort, 'disk trouble'); end");
    const healthDuring: number[] = [];
    try {
      const started = await s.tech.post(`/api/imports/${d.id}/commit`).send({ mapping: mappingFor(d) });
      expect(started.status).toBe(202);
      for (;;) {
        const r = await s.tech.get(`/api/imports/${d.id}`);
        healthDuring.push((await s.tech.get('/api/health')).status);
        if (r.body.status !== 'committing') {
          expect(r.body.status).toBe('failed');
          expect(r.body.error).toMatch(/nothing was imported/);
          break;
        }
      }
    } finally {
      s.h.database.sqlite.exec('drop trigger fail_late');
    }
    expect(healthDuring.every((x) => x === 200)).toBe(true);
    expect(s.h.database.db.select().from(weighings).where(eq(weighings.importId, d.id)).all()).toEqual([]);
    const stored = s.h.database.sqlite.prepare("select count(*) as n from coupon_results where tag like 'SL-%' and dry_mass_g is not null").get() as {
      n: number;
    };
    expect(stored.n).toBe(0);
    // The same file again commits whole: 6,000 weighings and their results rows.
    const again = await committed(s.tech, d);
    expect(again.status, again.error ?? '').toBe('committed');
    const written = s.h.database.db.select({ id: weighings.id }).from(weighings).where(eq(weighings.importId, d.id)).all();
    expect(written).toHaveLength(6_000);
    // Written 50 rows per INSERT: the audit's id range is exactly the rows written.
    const ids = written.map((w) => w.id).sort((a, b) => a - b);
    const added = s.h.database.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'import'), eq(auditLog.entityId, String(d.id)), eq(auditLog.action, 'add-readings')))
      .all();
    expect(added).toHaveLength(1);
    expect((added[0]!.after as { weighingIds: unknown }).weighingIds).toEqual({ first: ids[0], last: ids[5_999] });
    expect(ids[5_999]! - ids[0]! + 1).toBe(6_000);
    const after = s.h.database.sqlite.prepare("select count(*) as n from coupon_results where tag like 'SL-%' and dry_mass_g is not null").get() as {
      n: number;
    };
    expect(after.n).toBe(6_000);
  });
});

describe('imports: undo of a big import, a slice at a time', () => {
  let s: Awaited<ReturnType<typeof shop>>;
  beforeAll(async () => {
    s = await shop();
  });
  afterAll(async () => {
    await s.h.close();
  });

  const stored = () =>
    (s.h.database.sqlite.prepare("select count(*) as n from coupon_results where tag like 'UN-%' and dry_mass_g is not null").get() as { n: number }).n;

  it('leaves every weighing current when the database fails in the middle of an undo, then undoes whole while serving', async () => {
    const sp = s.h.database.db.select().from(species).limit(1).get()!;
    const tags = Array.from({ length: 5_000 }, (_, i) => `UN-${String(i).padStart(4, '0')}`);
    const ins = s.h.database.sqlite.prepare("insert into coupons (tag, species_id, role) values (?, ?, 'treated')");
    s.h.database.db.transaction((tx) =>
      refreshResults(
        tx,
        tags.map((t) => Number(ins.run(t, sp.id).lastInsertRowid)),
      ),
    );
    const lines = ['tag,mass', ...tags.map((t, i) => `${t},${(12 + i / 10_000).toFixed(4)}`)];
    const d = (await upload(s.tech, 'undo-slices.csv', Buffer.from(`${lines.join('\n')}\n`))).body as ImportDetail;
    expect((await committed(s.tech, d)).status).toBe('committed');
    const written = s.h.database.db.select({ id: weighings.id }).from(weighings).where(eq(weighings.importId, d.id)).all();
    expect(written).toHaveLength(5_000);
    const last = Math.max(...written.map((w) => w.id));
    const current = () =>
      s.h.database.db
        .select({ id: weighings.id })
        .from(weighings)
        .where(and(eq(weighings.importId, d.id), isNull(weighings.deletedAt)))
        .all().length;
    // One entry on the import stands for the whole undo (the rows keep their values); none per coupon.
    const deletions = () =>
      s.h.database.db
        .select()
        .from(auditLog)
        .where(eq(auditLog.action, 'delete-readings'))
        .all()
        .map((e) => ({ entity: e.entity, entityId: e.entityId, after: e.after as unknown, reason: e.reason }));
    expect(stored()).toBe(5_000);

    // A real failure inside SQLite on the soft-delete of the last weighing, after two slices of 2,000 were written.
    s.h.database.sqlite.exec(
      `create trigger fail_mid_undo before update of deleted_at on weighings when new.id = ${last} begin select raise(abort, 'disk trouble'); end`,
    );
    const healthDuring: number[] = [];
    try {
      expect((await s.tech.post(`/api/imports/${d.id}/undo`).send({ reason: 'wrong balance' })).status).toBe(202);
      for (;;) {
        const r = await s.tech.get(`/api/imports/${d.id}`);
        healthDuring.push((await s.tech.get('/api/health')).status);
        if (r.body.status !== 'undoing') {
          expect(r.body.status).toBe('committed');
          expect(r.body.error).toMatch(/nothing was changed/);
          break;
        }
      }
    } finally {
      s.h.database.sqlite.exec('drop trigger fail_mid_undo');
    }
    expect(healthDuring.every((x) => x === 200)).toBe(true);
    expect(current()).toBe(5_000);
    expect(stored()).toBe(5_000);
    expect(deletions()).toEqual([]);

    // Again, whole: reads and health answer meanwhile; a write that arrives while the undo's transaction is
    // open (the import reads `undoing` before and after it) is told to try again in a moment.
    const sp2 = s.h.database.db.select().from(species).limit(1).get()!;
    const during: { before: string; after: string; write: number; health: number }[] = [];
    expect((await s.tech.post(`/api/imports/${d.id}/undo`).send({ reason: 'wrong balance' })).status).toBe(202);
    for (;;) {
      const before = (await s.tech.get(`/api/imports/${d.id}`)).body.status as string;
      if (before !== 'undoing') {
        expect(before).toBe('undone');
        break;
      }
      const write = (await s.tech.post('/api/coupons').send({ tag: `UW-${during.length}`, speciesId: sp2.id, role: 'treated' })).status;
      const health = (await s.tech.get('/api/health')).status;
      const after = (await s.tech.get(`/api/imports/${d.id}`)).body.status as string;
      during.push({ before, after, write, health });
    }
    expect(during.every((x) => x.health === 200)).toBe(true);
    for (const x of during) if (x.after === 'undoing') expect(x.write).toBe(503);
    expect(current()).toBe(0);
    expect(stored()).toBe(0);
    expect(deletions()).toEqual([
      {
        entity: 'import',
        entityId: String(d.id),
        after: { deletedAt: expect.any(String), coupons: 5_000, weighings: 5_000, checks: 0, stages: ['dry'] },
        reason: `Import ${d.id} undone: wrong balance`,
      },
    ]);
    // Which readings the undo took away stays answerable from the rows: the import's, deleted at that time.
    const at = (deletions()[0]?.after as { deletedAt: string }).deletedAt;
    expect(
      s.h.database.db
        .select({ id: weighings.id })
        .from(weighings)
        .where(and(eq(weighings.importId, d.id), eq(weighings.deletedAt, at)))
        .all(),
    ).toHaveLength(5_000);
    const undone = (await s.tech.get(`/api/imports/${d.id}`)).body as ImportDetail;
    expect(undone).toMatchObject({ status: 'undone', undoReason: 'wrong balance', error: null });
  });

  it('puts an import the server stopped undoing back to committed, not failed', async () => {
    const d = (await upload(s.tech, 'comma-header.csv')).body as ImportDetail;
    expect((await committed(s.tech, d)).status).toBe('committed');
    s.h.database.sqlite.prepare("update imports set status = 'undoing' where id = ?").run(d.id);
    markStaleJobsFailed(s.h.database.db);
    const r = (await s.tech.get(`/api/imports/${d.id}`)).body as ImportDetail;
    expect(r.status).toBe('committed');
    expect(r.error).toMatch(/stopped while this import was being undone/);
  });
});

describe('imports: who may do what', () => {
  let s: Awaited<ReturnType<typeof shop>>;
  beforeAll(async () => {
    s = await shop();
  });
  afterAll(async () => {
    await s.h.close();
  });

  it('lets technicians and above import, viewers read, strangers nothing', async () => {
    const d = (await upload(s.tech, 'comma-header.csv')).body as ImportDetail;
    const anon = s.h.agent();
    expect((await anon.get('/api/imports')).status).toBe(401);
    expect((await upload(anon, 'comma-header.csv')).status).toBe(401);
    expect((await upload(s.viewer, 'comma-header.csv')).status).toBe(403);
    for (const call of [
      s.viewer.post(`/api/imports/${d.id}/preview`).send({ mapping: mappingFor(d) }),
      s.viewer.post(`/api/imports/${d.id}/commit`).send({ mapping: mappingFor(d) }),
      s.viewer.post(`/api/imports/${d.id}/undo`).send({ reason: 'not mine' }),
      s.viewer.post('/api/imports/presets').send({ name: 'x', importId: d.id, mapping: mappingFor(d) }),
    ]) {
      expect((await call).status).toBe(403);
    }
    expect((await s.viewer.get('/api/imports')).status).toBe(200);
    expect((await s.viewer.get(`/api/imports/${d.id}`)).status).toBe(200);
    expect((await s.viewer.get(`/api/imports/${d.id}/problems`)).status).toBe(200);
    const admin = await s.h.signIn('admin@demo.test');
    expect((await upload(admin, 'comma-header.csv')).status).toBe(201);
    expect((await s.viewer.get('/api/imports/9999')).status).toBe(404);
    // The coupons of the shop are untouched by all of this.
    expect(s.h.database.db.select().from(coupons).where(eq(coupons.tag, 'FX-01')).all()).toHaveLength(1);
  });
});
