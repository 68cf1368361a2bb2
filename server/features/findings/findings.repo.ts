import { and, asc, count, desc, eq, gte, inArray, max, ne, sql, type SQL } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { auditLog } from '../../db/schema/admin';
import { users } from '../../db/schema/auth';
import { findingComments, findingEvidence, findingRevisions, findings, signatures } from '../../db/schema/findings';
import { resins, species } from '../../db/schema/reference';
import { trials } from '../../db/schema/trials';
import { wikiPages, wikiPageTags } from '../../db/schema/wiki';
import type { FindingListQuery } from '../../../shared/schemas/findings';
import type { FindingState, ThreadEntryKind } from '../../../shared/constants/findings';

export type FindingRow = typeof findings.$inferSelect;
export type RevisionRow = typeof findingRevisions.$inferSelect;
export type EvidenceRow = typeof findingEvidence.$inferSelect;
export type CommentRow = typeof findingComments.$inferSelect;
export type SignatureRow = typeof signatures.$inferSelect;
export type PageRow = typeof wikiPages.$inferSelect;

export function findFinding(db: Db, id: number): FindingRow | undefined {
  return db.select().from(findings).where(eq(findings.id, id)).get();
}

export function listFindings(db: Db, q: FindingListQuery, userId: number) {
  const where = and(q.state ? eq(findings.state, q.state) : undefined, q.mine === 'true' ? eq(findings.createdBy, userId) : undefined);
  const sorts: Record<string, SQL> = {
    title: asc(findings.title),
    '-title': desc(findings.title),
    savedAt: asc(findings.savedAt),
    '-savedAt': desc(findings.savedAt),
    state: asc(findings.state),
  };
  const rows = db
    .select()
    .from(findings)
    .where(where)
    .orderBy(sorts[q.sort ?? ''] ?? desc(findings.savedAt), desc(findings.id))
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize)
    .all();
  const total = db.select({ n: count() }).from(findings).where(where).get()?.n ?? 0;
  return { rows, total };
}

export function nextVersionOf(db: Db, id: number): FindingRow | undefined {
  return db.select().from(findings).where(eq(findings.supersedesId, id)).orderBy(desc(findings.id)).get();
}

export function latestRevision(db: Db, findingId: number): RevisionRow | undefined {
  return db.select().from(findingRevisions).where(eq(findingRevisions.findingId, findingId)).orderBy(desc(findingRevisions.revision)).get();
}
export function listRevisions(db: Db, findingId: number): RevisionRow[] {
  return db.select().from(findingRevisions).where(eq(findingRevisions.findingId, findingId)).orderBy(desc(findingRevisions.revision)).all();
}
export function findRevision(db: Db, findingId: number, revision: number): RevisionRow | undefined {
  return db
    .select()
    .from(findingRevisions)
    .where(and(eq(findingRevisions.findingId, findingId), eq(findingRevisions.revision, revision)))
    .get();
}

/** Everyone who changed this version's content: who saved a revision and who attached evidence. */
export function editorIds(db: Db, findingId: number): number[] {
  const a = db.selectDistinct({ id: findingRevisions.createdBy }).from(findingRevisions).where(eq(findingRevisions.findingId, findingId)).all();
  const b = db.selectDistinct({ id: findingEvidence.createdBy }).from(findingEvidence).where(eq(findingEvidence.findingId, findingId)).all();
  return [...new Set([...a, ...b].map((r) => r.id))];
}

export function listEvidence(db: Db, findingId: number): EvidenceRow[] {
  return db
    .select()
    .from(findingEvidence)
    .where(eq(findingEvidence.findingId, findingId))
    .orderBy(asc(findingEvidence.position), asc(findingEvidence.id))
    .all();
}
export function nextEvidencePosition(db: Db, findingId: number): number {
  return (
    (db
      .select({ p: max(findingEvidence.position) })
      .from(findingEvidence)
      .where(eq(findingEvidence.findingId, findingId))
      .get()?.p ?? 0) + 1
  );
}

export function listThread(db: Db, findingId: number): CommentRow[] {
  return db.select().from(findingComments).where(eq(findingComments.findingId, findingId)).orderBy(asc(findingComments.id)).all();
}

export function findSignature(db: Db, findingId: number): SignatureRow | undefined {
  return db.select().from(signatures).where(eq(signatures.findingId, findingId)).get();
}

export function findPageOfFinding(db: Db, findingId: number): PageRow | undefined {
  return db.select().from(wikiPages).where(eq(wikiPages.findingId, findingId)).get();
}
export function pageTags(db: Db, pageId: number) {
  return db.select().from(wikiPageTags).where(eq(wikiPageTags.pageId, pageId)).orderBy(asc(wikiPageTags.id)).all();
}
export function currentPageOfSeries(db: Db, seriesId: number, exceptId: number): PageRow | undefined {
  return db
    .select()
    .from(wikiPages)
    .where(and(eq(wikiPages.seriesId, seriesId), ne(wikiPages.id, exceptId), sql`${wikiPages.supersededById} is null`))
    .get();
}
export function slugTaken(db: Db, slug: string): boolean {
  return db.select({ id: wikiPages.id }).from(wikiPages).where(eq(wikiPages.slug, slug)).get() !== undefined;
}

/** Names of people, read through this feature's own query (features never import each other). */
export function userNames(db: Db, ids: number[]): Map<number, string> {
  if (ids.length === 0) return new Map();
  return new Map(
    db
      .select({ id: users.id, name: users.name })
      .from(users)
      .where(inArray(users.id, ids))
      .all()
      .map((u) => [u.id, u.name]),
  );
}
export function findUser(db: Db, id: number) {
  return db.select().from(users).where(eq(users.id, id)).get();
}
/** Enabled users of the reviewer or admin role, who may be asked to review. */
export function reviewers(db: Db) {
  return db
    .select({ id: users.id, email: users.email, name: users.name })
    .from(users)
    .where(and(inArray(users.role, ['reviewer', 'admin']), eq(users.disabled, false), sql`${users.passwordHash} is not null`))
    .all();
}
export function emailsOf(db: Db, ids: number[]) {
  if (ids.length === 0) return [];
  return db
    .select({ id: users.id, email: users.email, name: users.name })
    .from(users)
    .where(and(inArray(users.id, ids), eq(users.disabled, false)))
    .all();
}

export function speciesNames(db: Db, ids: number[]) {
  if (ids.length === 0) return [];
  return db.select({ id: species.id, name: species.commonName }).from(species).where(inArray(species.id, ids)).all();
}
export function resinNames(db: Db, ids: number[]) {
  if (ids.length === 0) return [];
  return db.select({ id: resins.id, name: resins.name }).from(resins).where(inArray(resins.id, ids)).all();
}
export function trialTitles(db: Db, ids: number[]) {
  if (ids.length === 0) return [];
  return db.select({ id: trials.id, code: trials.code, title: trials.title }).from(trials).where(inArray(trials.id, ids)).all();
}

/** A saved view of the analysis feature as this feature needs it: read through our own query. */
export interface SavedViewCopy {
  id: number;
  title: string;
  snapshot: Record<string, unknown>;
  createdAt: string;
  createdBy: number | null;
}

/**
 * Reads a saved view (the analysis feature's `evidence` table) by id. Only what a finding copies:
 * the title and the frozen snapshot, plus the view and note that produced it, kept with the copy.
 */
export function readSavedView(db: Db, id: number): SavedViewCopy | undefined {
  if (!savedViewsExist(db)) return undefined;
  const row = db.get<{
    id: number;
    title: string;
    note: string | null;
    view: string;
    snapshot: string;
    fingerprint: string;
    created_at: string;
    created_by: number | null;
  }>(sql`select id, title, note, view, snapshot, fingerprint, created_at, created_by from evidence where id = ${id}`);
  if (!row) return undefined;
  return {
    id: row.id,
    title: row.title,
    snapshot: { ...(JSON.parse(row.snapshot) as Record<string, unknown>), view: JSON.parse(row.view) as unknown, note: row.note, fingerprint: row.fingerprint },
    createdAt: row.created_at,
    createdBy: row.created_by,
  };
}

/** Whether the analysis feature's saved-view table is there (it arrives with its own migration). */
function savedViewsExist(db: Db): boolean {
  return db.get<{ n: number }>(sql`select count(*) as n from sqlite_master where type = 'table' and name = 'evidence'`)?.n === 1;
}

export function listSavedViews(db: Db) {
  if (!savedViewsExist(db)) return [];
  return db.all<{ id: number; title: string; created_at: string; created_by: number | null }>(
    sql`select id, title, created_at, created_by from evidence order by id desc limit 200`,
  );
}

/** A signing attempt refused for a wrong password, kept in the audit log (which is also what the limit counts). */
export function recordRefusedSignature(db: Db, signerId: number, findingId: number, at: string) {
  db.insert(auditLog)
    .values({
      actorId: signerId,
      createdBy: signerId,
      action: 'signature-refused',
      entity: 'finding',
      entityId: String(findingId),
      reason: 'wrong password',
      createdAt: at,
    })
    .run();
}
export function countRefusedSignatures(db: Db, signerId: number, since: string): number {
  return (
    db
      .select({ n: count() })
      .from(auditLog)
      .where(and(eq(auditLog.action, 'signature-refused'), eq(auditLog.actorId, signerId), gte(auditLog.createdAt, since)))
      .get()?.n ?? 0
  );
}

// ---- writes shared by the service and the demo seeder (each runs inside the caller's transaction) ----

/** A new finding, version 1 of its own series, with its first revision. Returns its id. */
export function insertFinding(
  tx: Db,
  input: { title: string; bodyMd: string; trialIds: number[]; speciesIds: number[]; resinIds: number[] },
  userId: number,
  now: string,
): number {
  const content = { title: input.title, bodyMd: input.bodyMd, trialIds: input.trialIds, speciesIds: input.speciesIds, resinIds: input.resinIds };
  const row = tx
    .insert(findings)
    .values({ seriesId: 0, version: 1, ...content, savedAt: now, createdBy: userId })
    .returning({ id: findings.id })
    .get();
  tx.update(findings).set({ seriesId: row.id }).where(eq(findings.id, row.id)).run();
  tx.insert(findingRevisions)
    .values({ findingId: row.id, revision: 1, ...content, savedAt: now, createdBy: userId })
    .run();
  return row.id;
}

/** A copy of a saved view's snapshot (and its drawn plot) as the finding's next piece of evidence. Returns its position. */
export function insertEvidenceCopy(tx: Db, findingId: number, view: SavedViewCopy, svg: string | null, userId: number, now: string): number {
  const position = nextEvidencePosition(tx, findingId);
  tx.insert(findingEvidence)
    .values({ findingId, position, savedViewId: view.id, title: view.title, kind: 'saved-view', snapshot: view.snapshot, svg, createdBy: userId })
    .run();
  tx.update(findings).set({ savedAt: now }).where(eq(findings.id, findingId)).run();
  return position;
}

export function insertThreadEntry(tx: Db, findingId: number, kind: ThreadEntryKind, bodyMd: string, userId: number): void {
  tx.insert(findingComments).values({ findingId, kind, bodyMd, createdBy: userId }).run();
}

/** The finding goes to review: its state, when, and the thread entry that says so. */
export function markSubmitted(tx: Db, findingId: number, state: FindingState, userId: number, now: string): void {
  tx.update(findings).set({ state, submittedAt: now }).where(eq(findings.id, findingId)).run();
  insertThreadEntry(tx, findingId, 'submitted', 'Submitted for review.', userId);
}
