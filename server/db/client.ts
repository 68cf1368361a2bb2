import fs from 'node:fs';
import path from 'node:path';
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
import { MIGRATIONS_FOLDER } from '../paths';
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

export { MIGRATIONS_FOLDER };

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
 * Takes the one-process-per-DATA_DIR lock: a small SQLite file beside the database (`<file>-lock`), opened
 * in exclusive locking mode and written once, so this connection holds the operating system's file lock
 * until it closes; the system drops it when the process dies, even on kill -9, so no stale lock is left to
 * clean up. A second server, a restore or a seed on the same file is refused at once (DatabaseInUse).
 * The lock lives in its own file, not on the database, so that the same process can open a second
 * connection to the database (an import's commit holds its transaction there: decision 0017).
 */
function takeProcessLock(file: string): Database.Database {
  const lockFile = `${file}-lock`;
  if (!fs.existsSync(lockFile)) fs.writeFileSync(lockFile, '', { mode: 0o600 });
  const lock = new Database(lockFile, { timeout: 0 });
  try {
    lock.pragma('locking_mode = EXCLUSIVE');
    lock.pragma('journal_mode = OFF');
    // An exclusive write takes the lock; exclusive locking mode keeps it after the commit.
    lock.exec('BEGIN EXCLUSIVE; COMMIT');
  } catch (err) {
    lock.close();
    if ((err as { code?: string }).code === 'SQLITE_BUSY') throw new DatabaseInUse(file);
    throw err;
  }
  return lock;
}

/** The pragmas of every connection to the database: WAL, foreign keys on (off by default in SQLite), a safe sync. */
function configure(sqlite: Database.Database, busyTimeoutMs: number) {
  sqlite.pragma('journal_mode = WAL');
  sqlite.pragma('foreign_keys = ON');
  sqlite.pragma(`busy_timeout = ${busyTimeoutMs}`);
  sqlite.pragma('synchronous = NORMAL');
}

/**
 * Opens a SQLite file for this process, creating it owner-only (0600) in an owner-only folder (0700)
 * when it is new, after taking the process lock (above): a second process on the same file stops here.
 *
 * Its busy timeout is 0: the only other connection is an import's commit on a second connection of this
 * process, which holds the write lock for seconds across turns of the event loop; waiting for it would
 * block the event loop (SQLite sleeps in the calling thread), so a write arriving then fails at once with
 * SQLITE_BUSY, which the error middleware answers as 503 "try again in a moment". Reads never wait in WAL mode.
 */
export function openSqlite(file: string): Database.Database {
  if (file !== ':memory:') {
    fs.mkdirSync(path.dirname(file), { recursive: true, mode: 0o700 });
    // SQLite gives the -wal and -shm files the main file's permissions, so creating it 0600 covers them.
    if (!fs.existsSync(file)) fs.writeFileSync(file, '', { mode: 0o600, flag: 'wx' });
    else fs.chmodSync(file, 0o600);
  }
  const lock = file === ':memory:' ? null : takeProcessLock(file);
  let sqlite: Database.Database;
  try {
    sqlite = new Database(file, { timeout: 0 });
    configure(sqlite, 0);
  } catch (err) {
    lock?.close();
    throw err;
  }
  if (lock) {
    // The lock goes with the connection: whoever closes the database (server, restore, tests) frees it.
    const close = sqlite.close.bind(sqlite);
    sqlite.close = () => {
      close();
      lock.close();
      return sqlite;
    };
  }
  return sqlite;
}

/**
 * A second connection to a database this process already holds (openSqlite above), for an import's commit,
 * whose transaction stays open across turns of the event loop (decision 0017): it takes no process lock,
 * and like the app's connection it never waits for a lock (a wait sleeps the thread, and with it every
 * request); its caller retries instead.
 */
export function openSecondConnection(file: string): Database.Database {
  const sqlite = new Database(file, { timeout: 0, fileMustExist: true });
  configure(sqlite, 0);
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
 * WAL lets readers proceed during a write (an import's commit on a second connection).
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
