import { type AnySQLiteColumn, index, integer, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';
import { users } from './auth';
import { createdAt, createdBy, id } from './columns';
import { findings, signatures } from './findings';

export const WIKI_TAG_KINDS = ['species', 'resin'] as const;

/**
 * The published, frozen form of an approved finding: its content and rendered HTML copied at approval.
 * Evidence stays in finding_evidence (immutable once the finding is approved). A later approved version
 * sets `superseded_by_id`; the page itself stays readable.
 */
export const wikiPages = sqliteTable(
  'wiki_pages',
  {
    id: id(),
    slug: text('slug').notNull(),
    findingId: integer('finding_id')
      .notNull()
      .references(() => findings.id),
    seriesId: integer('series_id').notNull(),
    version: integer('version').notNull(),
    title: text('title').notNull(),
    bodyMd: text('body_md').notNull(),
    bodyHtml: text('body_html').notNull(),
    authorId: integer('author_id')
      .notNull()
      .references(() => users.id),
    authorName: text('author_name').notNull(),
    trials: text('trials', { mode: 'json' }).$type<{ id: number; code: string; title: string }[]>().notNull(),
    signatureId: integer('signature_id')
      .notNull()
      .references(() => signatures.id),
    approvedAt: text('approved_at').notNull(),
    supersededById: integer('superseded_by_id').references((): AnySQLiteColumn => wikiPages.id),
    createdAt: createdAt(),
    createdBy: createdBy().references(() => users.id),
  },
  (t) => [
    uniqueIndex('wiki_pages_slug_unique').on(t.slug),
    uniqueIndex('wiki_pages_finding_unique').on(t.findingId),
    index('wiki_pages_series_idx').on(t.seriesId),
    index('wiki_pages_superseded_idx').on(t.supersededById),
  ],
);

/** Species and resin tags of a page, with the names frozen as they were at approval. */
export const wikiPageTags = sqliteTable(
  'wiki_page_tags',
  {
    id: id(),
    pageId: integer('page_id')
      .notNull()
      .references(() => wikiPages.id, { onDelete: 'cascade' }),
    kind: text('kind', { enum: WIKI_TAG_KINDS }).notNull(),
    refId: integer('ref_id').notNull(),
    name: text('name').notNull(),
    createdAt: createdAt(),
    createdBy: createdBy(),
  },
  (t) => [index('wiki_page_tags_page_idx').on(t.pageId), index('wiki_page_tags_ref_idx').on(t.kind, t.refId)],
);
