import type { Db } from './client';
import { auditLog } from './schema/admin';

export interface AuditEntry {
  actorId: number | null;
  action: string;
  entity: string;
  entityId: string | number | null;
  before?: unknown;
  after?: unknown;
  reason?: string | null;
}

/** Appends one audit row. Call it inside the same transaction as the change it records. */
export function writeAudit(db: Pick<Db, 'insert'>, entry: AuditEntry): void {
  db.insert(auditLog)
    .values({
      actorId: entry.actorId,
      createdBy: entry.actorId,
      action: entry.action,
      entity: entry.entity,
      entityId: entry.entityId === null ? null : String(entry.entityId),
      before: entry.before ?? null,
      after: entry.after ?? null,
      reason: entry.reason ?? null,
    })
    .run();
}
