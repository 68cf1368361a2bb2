import { index, integer, sqliteTable, text } from 'drizzle-orm/sqlite-core';
import { users } from './auth';
import { createdAt, createdBy, id } from './columns';

/** Every change worth tracing: who, when, which entity, the row before and after, and why. */
export const auditLog = sqliteTable(
  'audit_log',
  {
    id: id(),
    actorId: integer('actor_id').references(() => users.id),
    /**
     * The actor's name and e-mail as they were when the entry was written (a trigger fills them from
     * users on every insert, whatever code path inserts): a later rename must not rewrite the past.
     */
    actorName: text('actor_name'),
    actorEmail: text('actor_email'),
    action: text('action').notNull(),
    entity: text('entity').notNull(),
    entityId: text('entity_id'),
    before: text('before', { mode: 'json' }),
    after: text('after', { mode: 'json' }),
    reason: text('reason'),
    createdAt: createdAt(),
    createdBy: createdBy(),
  },
  (t) => [index('audit_log_entity_idx').on(t.entity, t.entityId), index('audit_log_actor_idx').on(t.actorId)],
);

/** Mail captured by the in-process fake SMTP server. Nothing leaves the machine by default. */
export const outbox = sqliteTable(
  'outbox',
  {
    id: id(),
    fromAddress: text('from_address').notNull(),
    toAddress: text('to_address').notNull(),
    subject: text('subject').notNull(),
    textBody: text('text_body').notNull(),
    raw: text('raw').notNull(),
    createdAt: createdAt(),
    createdBy: createdBy(),
  },
  (t) => [index('outbox_created_idx').on(t.createdAt)],
);

/** Shop-wide settings as key/value rows (shop name, altitude, drying rule…). */
export const settings = sqliteTable('settings', {
  key: text('key').primaryKey(),
  value: text('value', { mode: 'json' }).notNull(),
  createdAt: createdAt(),
  createdBy: createdBy(),
});

/** One row the health check rewrites, to prove the database can still be written, not only read. */
export const healthProbe = sqliteTable('health_probe', {
  id: integer('id').primaryKey(),
  checkedAt: text('checked_at').notNull(),
});
