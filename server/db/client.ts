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
import { storageProblem } from './storage-errors';
import * as resultsSchema from './schema/results';
import * as analysisSchema from './schema/analysis';
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
  ...analysisSchema,
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

/** Another process (a running server, a restore, a seed) holds the database. */
export class DatabaseInUse extends Error {
  constructor(file: string) {
    super(
      `Another Lumenbook process is using ${file} (is a server still running on this DATA_DIR?). ` +
        'Stop it first: two processes on one database would fail each other\'s writes with "database is locked".',
    );
    this.name = 'DatabaseInUse';
  }
}

/**
 * Opens a SQLite file in exclusive locking mode, creating it owner-only (0600) in an owner-only
 * folder (0700) when it is new. Exclusive mode holds the file lock for as long as the connection is
 * open, so a second server, a restore or a seed on the same file is refused at once instead of failing
 * writes later; the operating system drops the lock when the process dies, even on kill -9.
 * (In WAL mode an exclusive connection keeps the WAL index in its own memory: no -shm file.)
 */
export function openSqlite(file: string): Database.Database {
  if (file !== ':memory:') {
    fs.mkdirSync(path.dirname(file), { recursive: true, mode: 0o700 });
    // SQLite gives the -wal file the main file's permissions, so creating it 0600 covers both.
    if (!fs.existsSync(file)) fs.writeFileSync(file, '', { mode: 0o600, flag: 'wx' });
    else fs.chmodSync(file, 0o600);
  }
  const sqlite = new Database(file, { timeout: 0 });
  try {
    sqlite.pragma('locking_mode = EXCLUSIVE');
    sqlite.pragma('journal_mode = WAL');
    // A write takes the lock now rather than at the first request.
    sqlite.exec('BEGIN IMMEDIATE; COMMIT');
  } catch (err) {
    sqlite.close();
    if ((err as { code?: string }).code === 'SQLITE_BUSY') throw new DatabaseInUse(file);
    throw err;
  }
  sqlite.pragma('foreign_keys = ON');
  sqlite.pragma('busy_timeout = 5000');
  sqlite.pragma('synchronous = NORMAL');
  return sqlite;
}

/**
 * Applies the committed migrations. On a full disk SQLite rolls the failed transaction back itself,
 * and the migrator's own ROLLBACK then fails with "cannot rollback - no transaction is active", which
 * hides the cause: say plainly what happened instead.
 */
export function applyMigrations(db: Db, sqlite: Database.Database): void {
  try {
    migrate(db, { migrationsFolder: MIGRATIONS_FOLDER });
  } catch (err) {
    const problem = storageProblem(err) ?? (/cannot rollback/i.test(String((err as Error).message)) && !sqlite.inTransaction ? 'full' : null);
    if (problem === 'full') {
      throw new Error(`The database could not be set up: the disk holding ${sqlite.name} is full. Free some space and start again.`, { cause: err });
    }
    if (problem === 'read-only') {
      throw new Error(`The database could not be set up: ${sqlite.name} cannot be written (read-only file or disk).`, { cause: err });
    }
    throw err;
  }
}

/**
 * Opens (creating if needed) the SQLite file and applies the committed migrations.
 * WAL lets readers proceed during a write; the busy timeout rides out short lock waits instead of
 * failing with SQLITE_BUSY; foreign keys are off by default in SQLite and must be switched on per connection.
 */
export function openDatabase(file: string): Database_ {
  const sqlite = openSqlite(file);
  const db = drizzle(sqlite, { schema });
  try {
    applyMigrations(db, sqlite);
  } catch (err) {
    sqlite.close();
    throw err;
  }
  return { sqlite, db, close: () => sqlite.close() };
}
