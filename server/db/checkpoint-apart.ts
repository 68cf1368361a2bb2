import { createRequire } from 'node:module';
import { Worker } from 'node:worker_threads';
import type Database from 'better-sqlite3';

/**
 * A long write (an import's commit or undo, decision 0017) leaves tens of MB of pages in the write-ahead
 * log. Copied back into the database file by SQLite's automatic checkpoint at COMMIT, they held the event
 * loop ~90 ms at 100,000 readings (the slowest answer other users saw during the commit). The long write's
 * connection turns that off, and this copies them in a short-lived thread holding nothing but
 * better-sqlite3 (a few MB, gone when it ends): a PASSIVE checkpoint, which never blocks readers or the
 * app's writes. If it cannot run, nothing is lost: the log stays valid, and the app connection's own
 * automatic checkpoint copies it at one of its next commits.
 */
const CODE = `
const { workerData } = require('node:worker_threads');
const Database = require(workerData.driver);
const db = new Database(workerData.file, { fileMustExist: true, timeout: 5000 });
try {
  db.pragma('wal_checkpoint(PASSIVE)');
} finally {
  db.close();
}
`;

const driver = createRequire(import.meta.url).resolve('better-sqlite3');

/**
 * The threads still running. Whoever removes a data folder waits for them first: a thread that opens the
 * database after the app's last connection closed creates its `-wal` and `-shm` files anew, so a folder
 * removed meanwhile is not empty when its removal ends (ENOTEMPTY, seen in CI on a test's temporary folder).
 */
const running = new Set<Promise<void>>();

/** Settles when every checkpoint thread started so far has ended. */
export async function checkpointsSettled(): Promise<void> {
  while (running.size > 0) await Promise.all([...running]);
}

/** Starts the checkpoint of this database's log in a thread of its own; settles when the thread has ended. */
export function checkpointApart(file: string): Promise<void> {
  const done = startCheckpoint(file);
  running.add(done);
  void done.then(() => running.delete(done));
  return done;
}

function startCheckpoint(file: string): Promise<void> {
  return new Promise((resolve) => {
    try {
      const worker = new Worker(CODE, { eval: true, workerData: { file, driver } });
      // Its failure is not the write's (see above): the thread's error is dropped, not thrown.
      worker.once('error', () => {});
      worker.once('exit', () => resolve());
    } catch {
      resolve();
    }
  });
}

/** SQLite's own automatic checkpoint (pages in the log), which the app's connection keeps (client.ts). */
const APP_AUTOCHECKPOINT = 1_000;
/** The checkpoint threads running per app connection: its own automatic checkpoint is off while any runs. */
const pausedFor = new WeakMap<Database.Database, number>();

/**
 * The checkpoint of a long write's log in a thread of its own (above), with the app's connection kept from
 * copying that log itself meanwhile: its next write (the health probe writes every few seconds, a user at
 * any time) would otherwise run SQLite's automatic checkpoint of tens of MB on the event loop, ~80 ms, just
 * before the thread does. Its automatic checkpoint is back on when the last such thread has ended.
 */
export function checkpointApartFrom(app: Database.Database): Promise<void> {
  pausedFor.set(app, (pausedFor.get(app) ?? 0) + 1);
  app.pragma('wal_autocheckpoint = 0');
  return checkpointApart(app.name).finally(() => {
    const left = (pausedFor.get(app) ?? 1) - 1;
    pausedFor.set(app, left);
    if (left === 0 && app.open) app.pragma(`wal_autocheckpoint = ${APP_AUTOCHECKPOINT}`);
  });
}
