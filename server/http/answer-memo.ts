import type { Db } from '../db/client';
import { createAuditMemo } from '../db/audit-memo';
import { JsonText } from './routes';

/**
 * A list answer remembered as its JSON text until the records change (the audit counter, decision 0018),
 * and also each minute when it depends on the clock. Polled lists (runs, trials, Bench) are read many
 * times between two writes; each read then costs one index lookup instead of the queries and the
 * stringify. The key must name everything the answer depends on besides the records and the minute.
 */
export function createAnswerMemo(db: Db, options: { perMinute?: boolean; max?: number } = {}) {
  const memo = createAuditMemo<JsonText>(db, options);
  return (key: string, now: Date, compute: () => unknown): JsonText => memo.get(key, now, () => new JsonText(JSON.stringify(compute())));
}
