import type { Db } from '../../db/client';
import { lastAuditId } from '../../db/audit-memo';
import { runsTouchedSince } from './runs.repo';

/**
 * Values remembered per run until a write touches that run (its coupons, their readings, the run itself),
 * found from the audit entries written since the last look (`runsTouchedSince`): after a weighing is saved
 * only that coupon's run is worked out again, not every run of the page (a page of 50 runs of 500 coupons
 * took over half a second to rebuild). A write the audit cannot place (an import, a lot, the settings)
 * empties it. `key` names anything else the values depend on (the shop's drying rule).
 */
export function createRunMemo<V>(db: Db, max = 1000) {
  let seen = -1;
  let key = '';
  let byRun = new Map<number, V>();
  return {
    /** The remembered values, brought up to date with the records (call once per read, then get/set). */
    sync(currentKey = ''): Map<number, V> {
      const audit = lastAuditId(db);
      if (currentKey !== key || seen < 0 || byRun.size > max) {
        byRun = new Map();
      } else if (audit !== seen) {
        const touched = runsTouchedSince(db, seen);
        if (touched === 'all') byRun = new Map();
        else for (const id of touched) byRun.delete(id);
      }
      seen = audit;
      key = currentKey;
      return byRun;
    },
  };
}
