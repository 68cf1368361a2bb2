import type { Db } from './client';
import { prepared } from './prepared';

/**
 * Remembers answers that are costly to compute at a shop's full size (Bench, trial progress, run check
 * counts) until the records change. Every write of the records adds an audit entry in its own
 * transaction, so the highest audit id is a change counter that costs one index lookup to read; the
 * memo is emptied when it moves, and also each minute (`minuteKey`) when the answer depends on the
 * clock. One process per data folder (decision 0012), so no other writer can slip past it.
 */
/** The highest audit entry id: one index lookup through a statement prepared once. */
export function lastAuditId(db: Db): number {
  return (prepared(db, 'select max(id) as id from audit_log').get() as { id: number | null }).id ?? 0;
}

export function createAuditMemo<V>(db: Db, options: { perMinute?: boolean; max?: number } = {}) {
  let stamp = '';
  let values = new Map<string, V>();
  return {
    get(key: string, now: Date, compute: () => V): V {
      const audit = lastAuditId(db);
      const next = options.perMinute ? `${audit}|${Math.floor(now.getTime() / 60_000)}` : String(audit);
      if (next !== stamp || values.size >= (options.max ?? 1000)) {
        stamp = next;
        values = new Map();
      }
      const hit = values.get(key);
      if (hit !== undefined) return hit;
      const v = compute();
      values.set(key, v);
      return v;
    },
  };
}
