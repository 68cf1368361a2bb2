import type Database from 'better-sqlite3';
import type { Db } from '../../db/client';
import { writeAudit } from '../../db/audit';
import { writeInSteps } from '../../db/write-in-steps';
import { Conflict } from '../../http/errors';
import type { Measurements } from '../../measurements/measurements';
import type { Steps } from '../../measurements/steps';
import { currentWeighingIdsOfImportAfter, findImport, findWeighingState, updateImport } from './imports.repo';

/** Weighings soft-deleted (and coupons refreshed) per step of an undo, as the commit's slices. */
const UNDO_SLICE = 2_000;
/** Weighing ids of the import read per step. */
const ID_PAGE = 20_000;

/** Everything the undo's transaction works from. */
export interface UndoJob {
  importId: number;
  actor: { id: number };
  reason: string;
}

/**
 * The undo's transaction, step by step: the import's current weighings are soft-deleted through the
 * measurements module's bulk path (kept, never removed, with their values; one `delete-readings` audit
 * entry on the import, as its commit wrote one `add-readings` entry; the touched results rows rewritten),
 * the readings it corrected get their earlier values back as new corrections, and the import is marked
 * undone, audited with who and why. Yields the share done.
 */
function* undoSteps(db: Db, measurements: Measurements, job: UndoJob, now: () => Date): Steps<void> {
  const { importId: id, actor, reason } = job;
  const r = findImport(db, id);
  // Marked `undoing` on the app's connection before the job began; nothing else moves it meanwhile.
  if (!r || r.status !== 'undoing') throw new Conflict('Only a committed import can be undone');
  const why = `Import ${id} undone: ${reason}`;
  // Read a page per step: 100,000 ids at once held the thread for ~100 ms.
  const ids: number[] = [];
  for (let page = currentWeighingIdsOfImportAfter(db, id, 0, ID_PAGE); page.length;) {
    for (const w of page) ids.push(w);
    yield 0;
    page = page.length < ID_PAGE ? [] : currentWeighingIdsOfImportAfter(db, id, page[page.length - 1] as number, ID_PAGE);
  }
  if (ids.length) {
    const steps = measurements.bulkDeleteInSteps(db, actor, { weighings: ids }, why, { slice: UNDO_SLICE, audit: { importId: id } });
    for (let s = steps.next(); !s.done; s = steps.next()) yield s.value * 0.95;
  }
  let n = 0;
  for (const c of r.corrections ?? []) {
    const current = findWeighingState(db, c.newId);
    const old = findWeighingState(db, c.oldId);
    if (current && old && current.supersededBy === null && current.deletedAt === null) {
      measurements.correctWeighing(db, actor, c.newId, { massG: old.massG, measuredAt: old.measuredAt, reason: why });
    }
    if (++n % UNDO_SLICE === 0) yield 0.95;
  }
  const undoneAt = now().toISOString();
  updateImport(db, id, { status: 'undone', undoneAt, undoneBy: actor.id, undoReason: reason, error: null });
  writeAudit(db, { actorId: actor.id, action: 'undo', entity: 'import', entityId: id, before: { status: 'committed' }, after: { status: 'undone' }, reason });
}

/**
 * Writes the undo through `writeInSteps` (decision 0017), as the commit is written: one transaction on a
 * second connection, a slice at a time with the event loop free between slices; on any error it is rolled
 * back and nothing of the undo is kept.
 */
export function writeUndo(
  app: Database.Database,
  measurements: Measurements,
  job: UndoJob,
  now: () => Date,
  onProgress: (f: number) => void = () => {},
): Promise<void> {
  return writeInSteps(app, (db) => undoSteps(db, measurements, job, now), onProgress);
}
