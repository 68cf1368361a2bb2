import { parentPort } from 'node:worker_threads';
import { drizzle } from 'drizzle-orm/better-sqlite3';
import { openWorkerConnection, schema } from '../../db/client';
import { AppError } from '../../http/errors';
import { createMeasurements } from '../../measurements/measurements';
import { unpackJob, writeCommit, type CommitOutcome, type PackedCommitJob } from './commit';

/**
 * The worker thread that writes an import's commit (decision 0017): started ahead of the commit (loading
 * its modules takes most of a second), it waits for one job, writes it in one transaction on its own
 * connection to the same WAL database (the main thread's process lock covers it), posts the outcome and
 * ends. The main thread keeps answering other requests meanwhile; readers see the data before the commit
 * until it ends.
 */
export interface CommitWorkerInput {
  file: string;
  job: PackedCommitJob;
  /** The main thread's clock minus this thread's (tests move the app's clock). */
  nowOffsetMs: number;
}
export type CommitWorkerOutput =
  | { ok: CommitOutcome }
  | { error: { message: string; app: { code: AppError['code']; fieldErrors?: AppError['fieldErrors'] } | null; sqliteCode: string | null; stack?: string } };

function run(input: CommitWorkerInput): CommitWorkerOutput {
  const sqlite = openWorkerConnection(input.file);
  try {
    const db = drizzle(sqlite, { schema });
    const now = () => new Date(Date.now() + input.nowOffsetMs);
    return { ok: writeCommit(db, createMeasurements({ now }), unpackJob(input.job), now) };
  } catch (err) {
    const e = err as Error & { code?: unknown };
    return {
      error: {
        message: e.message,
        app: err instanceof AppError ? { code: err.code, fieldErrors: err.fieldErrors } : null,
        sqliteCode: typeof e.code === 'string' ? e.code : null,
        stack: e.stack,
      },
    };
  } finally {
    sqlite.close();
  }
}

parentPort?.once('message', (input: CommitWorkerInput) => parentPort?.postMessage(run(input)));
parentPort?.postMessage('ready');
