import { index, sqliteTable, text } from 'drizzle-orm/sqlite-core';
import type { EvidenceSnapshot, EvidenceView } from '../../../shared/schemas/analysis';
import { users } from './auth';
import { createdAt, createdBy, id } from './columns';

/**
 * A saved Compare view: the view (filters, SG basis, comparison) and a frozen snapshot of its numbers
 * and plot. Rows are never updated: the snapshot is evidence, and a newer answer is detected by
 * computing the view again and comparing fingerprints.
 */
export const evidence = sqliteTable(
  'evidence',
  {
    id: id(),
    title: text('title').notNull(),
    note: text('note'),
    view: text('view', { mode: 'json' }).$type<EvidenceView>().notNull(),
    snapshot: text('snapshot', { mode: 'json' }).$type<EvidenceSnapshot>().notNull(),
    /** SHA-256 (hex) of the snapshot's numbers. */
    fingerprint: text('fingerprint').notNull(),
    createdAt: createdAt(),
    createdBy: createdBy().references(() => users.id),
  },
  (t) => [index('evidence_created_by_idx').on(t.createdBy)],
);
