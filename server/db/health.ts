import type { Database_ } from './client';
import { healthProbe } from './schema/admin';
import { storageProblem } from './storage-errors';

export type DatabaseHealth = 'writable' | 'read-only' | 'full' | 'failing';

/** A real committed write (one row rewritten): a read-only or full database fails it, a SELECT would not. */
export function probeDatabase(database: Database_, now: Date): DatabaseHealth {
  try {
    const checkedAt = now.toISOString();
    database.db.insert(healthProbe).values({ id: 1, checkedAt }).onConflictDoUpdate({ target: healthProbe.id, set: { checkedAt } }).run();
    return 'writable';
  } catch (err) {
    return storageProblem(err) ?? 'failing';
  }
}
