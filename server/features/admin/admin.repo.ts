import { count, desc, eq } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { outbox, settings } from '../../db/schema/admin';

export type OutboxRow = typeof outbox.$inferSelect;

/** One page of the local outbox, newest first, and how many messages there are in all. */
export function listOutboxRows(db: Db, q: { limit: number; offset: number }): { rows: OutboxRow[]; total: number } {
  const rows = db.select().from(outbox).orderBy(desc(outbox.id)).limit(q.limit).offset(q.offset).all();
  const total = db.select({ n: count() }).from(outbox).get()?.n ?? 0;
  return { rows, total };
}

/** Stores one shop setting (JSON value), replacing what was there. */
export function putSetting(db: Db, key: string, value: unknown, createdBy: number): void {
  db.insert(settings).values({ key, value, createdBy }).onConflictDoUpdate({ target: settings.key, set: { value } }).run();
}

/** Removes a stored setting, so its default applies again. */
export function deleteSetting(db: Db, key: string): void {
  db.delete(settings).where(eq(settings.key, key)).run();
}
