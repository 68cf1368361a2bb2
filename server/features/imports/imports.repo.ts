import { and, asc, count, desc, eq, inArray, isNull, ne, sql } from 'drizzle-orm';
import { alias } from 'drizzle-orm/sqlite-core';
import type { Db } from '../../db/client';
import { users } from '../../db/schema/auth';
import { coupons, weighings } from '../../db/schema/coupons';
import { importPresets, importProblems, imports } from '../../db/schema/imports';
import { runs } from '../../db/schema/runs';
import type { ImportStatus } from '../../../shared/constants/imports';
import { prepared } from '../../measurements/results';
import { once } from '../../db/prepared';
import type { ImportProblem } from '../../../shared/schemas/imports';

export type ImportRow = typeof imports.$inferSelect;
export type PresetRow = typeof importPresets.$inferSelect;

export interface CouponKey {
  id: number;
  tag: string;
  role: 'treated' | 'control';
}

/**
 * Coupons' id, tag and role after `afterId`, in id order, `limit` at a time (the caller reads them page by
 * page). Read as single columns (better-sqlite3's pluck mode: no row object or array per coupon), the role
 * as the id's sign, and made into objects here: 100,000 coupons cost ~40 ms this way, ~160 ms as the
 * driver's row objects. Both reads run back to back on this connection, so they see the same coupons.
 */
export function couponKeysAfter(db: Db, afterId: number, limit: number): CouponKey[] {
  // Statement texts of their own: pluck mode is a setting of the prepared statement, which prepared() shares.
  const signedIds = prepared(db, "select case when role = 'control' then -id else id end from coupons where id > ? order by id limit ?")
    .pluck(true)
    .all(afterId, limit) as number[];
  if (signedIds.length === 0) return [];
  const last = Math.abs(signedIds[signedIds.length - 1] as number);
  const tags = prepared(db, 'select tag from coupons where id > ? and id <= ? order by id -- pluck').pluck(true).all(afterId, last) as string[];
  const out = new Array<CouponKey>(signedIds.length);
  for (let i = 0; i < signedIds.length; i++) {
    const s = signedIds[i] as number;
    // One shared string per role rather than one per coupon.
    out[i] = s < 0 ? { id: -s, tag: tags[i] as string, role: 'control' } : { id: s, tag: tags[i] as string, role: 'treated' };
  }
  return out;
}

export function couponKeysByIds(db: Db, ids: number[]): CouponKey[] {
  if (ids.length === 0) return [];
  return db.select({ id: coupons.id, tag: coupons.tag, role: coupons.role, runId: coupons.runId }).from(coupons).where(inArray(coupons.id, ids)).all();
}

/**
 * Which of these values are coupon tags. Detection asks it once per column with every sampled value (up
 * to a few thousand), so it is one statement binding them as one JSON array, prepared once per connection:
 * asked value by value, the lookups held the event loop ~35 ms per upload of a file of 100,000 rows.
 */
export function tagsAmong(db: Db, values: readonly string[]): Set<string> {
  if (values.length === 0) return new Set();
  return new Set(
    prepared(db, 'select tag from coupons where tag in (select value from json_each(?))')
      .pluck(true)
      .all(JSON.stringify([...new Set(values)])) as string[],
  );
}

export function findRun(db: Db, id: number) {
  return db.select({ id: runs.id, code: runs.code }).from(runs).where(eq(runs.id, id)).get();
}

export function couponIdsOfRun(db: Db, runId: number): number[] {
  return db
    .select({ id: coupons.id })
    .from(coupons)
    .where(eq(coupons.runId, runId))
    .orderBy(asc(coupons.tag))
    .all()
    .map((r) => r.id);
}

export function insertImport(db: Db, values: typeof imports.$inferInsert): ImportRow {
  return db.insert(imports).values(values).returning().get();
}

export function updateImport(db: Db, id: number, set: Partial<typeof imports.$inferInsert>): void {
  db.update(imports).set(set).where(eq(imports.id, id)).run();
}

export function findImport(db: Db, id: number): ImportRow | undefined {
  return once(db, 'imports.findImport', () =>
    db
      .select()
      .from(imports)
      .where(eq(imports.id, sql.placeholder('id')))
      .prepare(),
  ).get({ id });
}

/** Imports of the same file that were committed and not undone. Part of every answer the client polls: prepared once per database. */
export function committedWithSha(db: Db, sha256: string, exceptId: number) {
  return once(db, 'imports.committedWithSha', () =>
    db
      .select({ id: imports.id, createdAt: imports.createdAt, status: imports.status })
      .from(imports)
      .where(
        and(
          eq(imports.sha256, sql.placeholder('sha256')),
          ne(imports.id, sql.placeholder('exceptId')),
          inArray(imports.status, ['committed', 'committing', 'undoing'] satisfies ImportStatus[]),
        ),
      )
      .orderBy(asc(imports.id))
      .prepare(),
  ).all({ sha256, exceptId });
}

export function countFileUses(db: Db, fileName: string): number {
  return db.select({ n: count() }).from(imports).where(eq(imports.fileName, fileName)).get()?.n ?? 0;
}

const undoer = alias(users, 'undoer');

export function listImports(db: Db, limit: number, offset: number) {
  const rows = db
    .select({ row: imports, createdByName: users.name, undoneByName: undoer.name })
    .from(imports)
    .leftJoin(users, eq(imports.createdBy, users.id))
    .leftJoin(undoer, eq(imports.undoneBy, undoer.id))
    .orderBy(desc(imports.createdAt), desc(imports.id))
    .limit(limit)
    .offset(offset)
    .all();
  const total = db.select({ n: count() }).from(imports).get()?.n ?? 0;
  return { rows, total };
}

/**
 * An import with the names of who uploaded and who undid it. Read for every answer the client polls while a
 * job runs (twice a second per open import screen): prepared once per database, where building the query
 * each time cost about as much as the rest of the answer.
 */
export function importWithNames(db: Db, id: number) {
  return once(db, 'imports.importWithNames', () =>
    db
      .select({ row: imports, createdByName: users.name, undoneByName: undoer.name })
      .from(imports)
      .leftJoin(users, eq(imports.createdBy, users.id))
      .leftJoin(undoer, eq(imports.undoneBy, undoer.id))
      .where(eq(imports.id, sql.placeholder('id')))
      .prepare(),
  ).get({ id });
}

/**
 * Jobs the server stopped in the middle of (a restart, a crash): their transaction never committed, so a
 * preview or commit failed, and an undo left the import as it was, committed.
 */
export function markStaleJobsFailed(db: Db): void {
  db.update(imports)
    .set({ status: 'committed', error: 'The server stopped while this import was being undone; nothing was changed, undo it again' })
    .where(eq(imports.status, 'undoing' satisfies ImportStatus))
    .run();
  db.update(imports)
    .set({ status: 'failed', error: 'The server stopped while this import was being processed; preview it again' })
    .where(inArray(imports.status, ['previewing', 'committing'] satisfies ImportStatus[]))
    .run();
}

/** Replaces the stored problem rows of an import, in one statement per row through a prepared insert. */
export function replaceProblems(db: Db, importId: number, problems: ImportProblem[]): void {
  db.delete(importProblems).where(eq(importProblems.importId, importId)).run();
  const c = (db as unknown as { session: { client: import('better-sqlite3').Database } }).session.client;
  const ins = c.prepare('insert into import_problems (import_id, row, "column", code, outcome, message, suggestions, cells) values (?, ?, ?, ?, ?, ?, ?, ?)');
  for (const p of problems) ins.run(importId, p.row, p.column, p.code, p.outcome, p.message, JSON.stringify(p.suggestions), JSON.stringify(p.cells));
}

export function problemsOf(db: Db, importId: number, limit: number, offset: number) {
  const items = db
    .select()
    .from(importProblems)
    .where(eq(importProblems.importId, importId))
    .orderBy(asc(importProblems.row), asc(importProblems.id))
    .limit(limit)
    .offset(offset)
    .all();
  const total = db.select({ n: count() }).from(importProblems).where(eq(importProblems.importId, importId)).get()?.n ?? 0;
  return { items, total };
}

/**
 * Current (not superseded, not deleted) weighings an import wrote, `limit` at a time in id order after
 * `afterId` (an undo of 100,000 weighings reads them a page per step, through the import's index).
 */
export function currentWeighingIdsOfImportAfter(db: Db, importId: number, afterId: number, limit: number): number[] {
  return prepared(db, 'select id from weighings where import_id = ? and id > ? and superseded_by is null and deleted_at is null order by id limit ? -- pluck')
    .pluck(true)
    .all(importId, afterId, limit) as number[];
}

export function findWeighingState(db: Db, id: number) {
  return db
    .select({
      id: weighings.id,
      massG: weighings.massG,
      measuredAt: weighings.measuredAt,
      supersededBy: weighings.supersededBy,
      deletedAt: weighings.deletedAt,
    })
    .from(weighings)
    .where(eq(weighings.id, id))
    .get();
}

/** The current weighing of each coupon at a stage, for corrections. */
export function currentWeighingAt(db: Db, couponId: number, stage: (typeof weighings.$inferSelect)['stage']) {
  return db
    .select({ id: weighings.id })
    .from(weighings)
    .where(and(eq(weighings.couponId, couponId), eq(weighings.stage, stage), isNull(weighings.supersededBy), isNull(weighings.deletedAt)))
    .orderBy(desc(weighings.id))
    .get();
}

/** Saved mappings for files of this shape, newest first. Part of every answer the client polls: prepared once per database. */
export function presetsForShape(db: Db, shapeKey: string): PresetRow[] {
  return once(db, 'imports.presetsForShape', () =>
    db
      .select()
      .from(importPresets)
      .where(eq(importPresets.shapeKey, sql.placeholder('shapeKey')))
      .orderBy(desc(importPresets.createdAt), desc(importPresets.id))
      .prepare(),
  ).all({ shapeKey });
}

export function allPresets(db: Db): PresetRow[] {
  return db.select().from(importPresets).orderBy(asc(importPresets.name)).all();
}

export function findPresetByName(db: Db, name: string): PresetRow | undefined {
  return db.select().from(importPresets).where(eq(importPresets.name, name)).get();
}

export function insertPreset(db: Db, values: typeof importPresets.$inferInsert): PresetRow {
  return db.insert(importPresets).values(values).returning().get();
}
