import { sql } from 'drizzle-orm';
import { integer, text } from 'drizzle-orm/sqlite-core';

// Shared column helpers. Timestamps are ISO-8601 UTC text so they sort and read the same everywhere.
export const id = () => integer('id').primaryKey({ autoIncrement: true });
export const createdAt = () =>
  text('created_at')
    .notNull()
    .default(sql`(strftime('%Y-%m-%dT%H:%M:%fZ','now'))`);
/** The user who created the row; null only for rows the system itself wrote (seed, migrations). */
export const createdBy = () => integer('created_by');
