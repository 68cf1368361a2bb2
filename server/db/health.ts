import { getTableName } from 'drizzle-orm';
import type { Database_ } from './client';
import { healthProbe } from './schema/admin';
import { databaseBusy, storageProblem } from './storage-errors';
import { prepared } from './prepared';

export type DatabaseHealth = 'writable' | 'busy' | 'read-only' | 'full' | 'failing';

const PROBE_SQL = `insert into ${getTableName(healthProbe)} (id, checked_at) values (1, ?) on conflict (id) do update set checked_at = excluded.checked_at`;

/**
 * A real committed write (one row rewritten): a read-only or full database fails it, a SELECT would not.
 * `busy` while an import's commit holds the write lock (a worker thread, a few seconds): healthy, not writable this instant.
 */
export function probeDatabase(database: Database_, now: Date): DatabaseHealth {
  try {
    const checkedAt = now.toISOString();
    // One statement prepared once per connection: monitors ask often, and building the query each time cost
    // more than the write.
    prepared(database.db, PROBE_SQL).run(checkedAt);
    return 'writable';
  } catch (err) {
    if (databaseBusy(err)) return 'busy';
    return storageProblem(err) ?? 'failing';
  }
}
