import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import Database from 'better-sqlite3';
import { drizzle, type BetterSQLite3Database } from 'drizzle-orm/better-sqlite3';
import { migrate } from 'drizzle-orm/better-sqlite3/migrator';
import * as authSchema from './schema/auth';
import * as adminSchema from './schema/admin';
import * as referenceSchema from './schema/reference';
import * as trialsSchema from './schema/trials';
import * as runsSchema from './schema/runs';
import * as couponsSchema from './schema/coupons';
import * as resultsSchema from './schema/results';
import * as importsSchema from './schema/imports';
import * as findingsSchema from './schema/findings';
import * as wikiSchema from './schema/wiki';

export const schema = {
  ...authSchema,
  ...adminSchema,
  ...referenceSchema,
  ...trialsSchema,
  ...runsSchema,
  ...couponsSchema,
  ...resultsSchema,
  ...findingsSchema,
  ...wikiSchema,
  ...importsSchema,
};
export type Db = BetterSQLite3Database<typeof schema>;

export interface Database_ {
  sqlite: Database.Database;
  db: Db;
  close(): void;
}

const here = path.dirname(fileURLToPath(import.meta.url));
export const MIGRATIONS_FOLDER = path.resolve(here, '../../drizzle');

/**
 * Opens (creating if needed) the SQLite file and applies the committed migrations.
 * WAL lets readers proceed during a write; the busy timeout rides out short lock waits instead of
 * failing with SQLITE_BUSY; foreign keys are off by default in SQLite and must be switched on per connection.
 */
export function openDatabase(file: string): Database_ {
  if (file !== ':memory:') fs.mkdirSync(path.dirname(file), { recursive: true });
  const sqlite = new Database(file);
  sqlite.pragma('journal_mode = WAL');
  sqlite.pragma('foreign_keys = ON');
  sqlite.pragma('busy_timeout = 5000');
  sqlite.pragma('synchronous = NORMAL');
  const db = drizzle(sqlite, { schema });
  migrate(db, { migrationsFolder: MIGRATIONS_FOLDER });
  return { sqlite, db, close: () => sqlite.close() };
}
