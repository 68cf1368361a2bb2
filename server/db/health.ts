import type { Database_ } from './client';
import { healthProbe } from './schema/admin';
import { databaseBusy, storageProblem } from './storage-errors';

export type DatabaseHealth = 'writable' | 'busy' | 'read-only' | 'full' | 'failing';

/**
 * A real committed write (one row rewritten): a read-only or full database fails it, a SELECT would not.
 * `busy` while an import's commit holds the write lock (a worker thread, a few seconds): healthy, not writable this instant.
 */
export function probeDatabase(database: Database_, now: Date): DatabaseHealth {
  try {
    const checkedAt = now.toISOString();
    database.db.insert(healthProbe).values({ id: 1, checkedAt }).onConflictDoUpdate({ target: healthProbe.id, set: { checkedAt } }).run();
    return 'writable';
  } catch (err) {
    if (databaseBusy(err)) return 'busy';
    return storageProblem(err) ?? 'failing';
  }
}
