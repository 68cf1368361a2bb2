import { drizzle } from 'drizzle-orm/better-sqlite3';
import { openSecondConnection, schema, type Db } from './client';
import { databaseBusy } from './storage-errors';
import type Database from 'better-sqlite3';
import { checkpointApartFrom } from './checkpoint-apart';
import type { Steps } from '../measurements/steps';

/** How long a long write waits for the write lock held by another connection before it gives up. */
const LOCK_WAIT_MS = 30_000;

const turn = () => new Promise<void>((resolve) => setImmediate(resolve));
const pause = (ms: number) => new Promise<void>((resolve) => setTimeout(resolve, ms));

/** What to do when the steps failed and their transaction was rolled back (see `writeInSteps`). */
export type Recover<T> = (db: Db, err: unknown) => { value: T } | null;

/**
 * Writes long work (an import's commit or undo) in ONE transaction on a connection of its own (decision
 * 0017), held open across turns of the event loop: the steps run a slice at a time, and between slices this
 * thread answers other requests. Readers on the app's connection see the data before the write until it
 * ends (WAL); a write arriving meanwhile finds the write lock taken and is told to try again in a moment
 * (503), because the app's connection never waits for a lock (a wait would sleep this thread). The lock is
 * taken at the start (`BEGIN IMMEDIATE`); while another connection holds it, the work waits its turn
 * without sleeping the thread. On any error the transaction is rolled back, so everything or nothing is
 * written; `recover` may then write what the failure means on the same connection and answer a value
 * instead of the error (null: the error is thrown on). `app` is the app's connection: the write opens its own
 * to the same file, and keeps the app's from copying the log after the commit (checkpoint-apart.ts).
 */
export async function writeInSteps<T>(
  app: Database.Database,
  steps: (db: Db) => Steps<T>,
  onProgress: (fraction: number) => void = () => {},
  recover: Recover<T> = () => null,
): Promise<T> {
  const sqlite = openSecondConnection(app.name);
  // Its log is copied into the database after the commit by another thread, not by this one at COMMIT.
  sqlite.pragma('wal_autocheckpoint = 0');
  let committed = false;
  try {
    const db = drizzle(sqlite, { schema });
    for (const until = Date.now() + LOCK_WAIT_MS; ;) {
      try {
        sqlite.exec('BEGIN IMMEDIATE');
        break;
      } catch (err) {
        if (!databaseBusy(err) || Date.now() > until) throw err;
        await pause(50);
      }
    }
    try {
      const run = steps(db);
      for (let r = run.next(); ; r = run.next()) {
        if (r.done) {
          sqlite.exec('COMMIT');
          committed = true;
          return r.value;
        }
        onProgress(r.value);
        await turn();
      }
    } catch (err) {
      if (sqlite.inTransaction) sqlite.exec('ROLLBACK');
      const recovered = recover(db, err);
      if (recovered) return recovered.value;
      throw err;
    }
  } finally {
    sqlite.close();
    if (committed) void checkpointApartFrom(app);
  }
}
