import { type AnySQLiteColumn, index, integer, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';
import { FINDING_STATES, SIGNATURE_MEANINGS, THREAD_ENTRY_KINDS } from '../../../shared/constants/findings';
import { users } from './auth';
import { createdAt, createdBy, id } from './columns';

/**
 * One version of a finding. Every version of the same finding shares `series_id` (the id of the first);
 * a new version of an approved finding is a new row that `supersedes_id` the approved one.
 * `created_by` is the author of this version.
 */
export const findings = sqliteTable(
  'findings',
  {
    id: id(),
    seriesId: integer('series_id').notNull(),
    version: integer('version').notNull().default(1),
    supersedesId: integer('supersedes_id').references((): AnySQLiteColumn => findings.id),
    state: text('state', { enum: FINDING_STATES }).notNull().default('draft'),
    title: text('title').notNull(),
    bodyMd: text('body_md').notNull().default(''),
    trialIds: text('trial_ids', { mode: 'json' }).$type<number[]>().notNull().default([]),
    speciesIds: text('species_ids', { mode: 'json' }).$type<number[]>().notNull().default([]),
    resinIds: text('resin_ids', { mode: 'json' }).$type<number[]>().notNull().default([]),
    /** The latest revision number in finding_revisions. */
    revision: integer('revision').notNull().default(1),
    savedAt: text('saved_at').notNull(),
    submittedAt: text('submitted_at'),
    approvedAt: text('approved_at'),
    createdAt: createdAt(),
    createdBy: createdBy()
      .notNull()
      .references(() => users.id),
  },
  (t) => [
    index('findings_state_idx').on(t.state),
    index('findings_series_idx').on(t.seriesId),
    index('findings_created_by_idx').on(t.createdBy),
    index('findings_supersedes_idx').on(t.supersedesId),
  ],
);

/**
 * The draft's version history: every saved state of the content with who saved it. Saves by the same
 * person within a few minutes fold into one revision (autosave would otherwise write one per pause).
 */
export const findingRevisions = sqliteTable(
  'finding_revisions',
  {
    id: id(),
    findingId: integer('finding_id')
      .notNull()
      .references(() => findings.id, { onDelete: 'cascade' }),
    revision: integer('revision').notNull(),
    title: text('title').notNull(),
    bodyMd: text('body_md').notNull(),
    trialIds: text('trial_ids', { mode: 'json' }).$type<number[]>().notNull(),
    speciesIds: text('species_ids', { mode: 'json' }).$type<number[]>().notNull(),
    resinIds: text('resin_ids', { mode: 'json' }).$type<number[]>().notNull(),
    savedAt: text('saved_at').notNull(),
    createdAt: createdAt(),
    createdBy: createdBy()
      .notNull()
      .references(() => users.id),
  },
  (t) => [uniqueIndex('finding_revisions_unique').on(t.findingId, t.revision), index('finding_revisions_editor_idx').on(t.createdBy)],
);

/**
 * Evidence attached to a finding: a frozen COPY of a saved view's snapshot taken when attached, so
 * later changes to the saved view (or its deletion) never change what was reviewed and signed.
 */
export const findingEvidence = sqliteTable(
  'finding_evidence',
  {
    id: id(),
    findingId: integer('finding_id')
      .notNull()
      .references(() => findings.id, { onDelete: 'cascade' }),
    position: integer('position').notNull(),
    /** Where the copy came from; no foreign key, because the copy must outlive the saved view. */
    savedViewId: integer('saved_view_id'),
    title: text('title').notNull(),
    kind: text('kind').notNull(),
    snapshot: text('snapshot', { mode: 'json' }).$type<Record<string, unknown>>().notNull(),
    svg: text('svg'),
    createdAt: createdAt(),
    createdBy: createdBy()
      .notNull()
      .references(() => users.id),
  },
  (t) => [index('finding_evidence_finding_idx').on(t.findingId)],
);

/** The review thread: comments, and the submit/return/approve events with their words. */
export const findingComments = sqliteTable(
  'finding_comments',
  {
    id: id(),
    findingId: integer('finding_id')
      .notNull()
      .references(() => findings.id, { onDelete: 'cascade' }),
    kind: text('kind', { enum: THREAD_ENTRY_KINDS }).notNull().default('comment'),
    bodyMd: text('body_md').notNull(),
    createdAt: createdAt(),
    createdBy: createdBy()
      .notNull()
      .references(() => users.id),
  },
  (t) => [index('finding_comments_finding_idx').on(t.findingId), index('finding_comments_author_idx').on(t.createdBy)],
);

/**
 * An electronic signature: who (and the name as printed then), when, what it means, and the SHA-256
 * of the canonical content that was signed. `signed_content` keeps that canonical text so that, when
 * a verification finds a different hash, it can say what differs.
 */
export const signatures = sqliteTable(
  'signatures',
  {
    id: id(),
    findingId: integer('finding_id')
      .notNull()
      .references(() => findings.id),
    signerId: integer('signer_id')
      .notNull()
      .references(() => users.id),
    signerName: text('signer_name').notNull(),
    meaning: text('meaning', { enum: SIGNATURE_MEANINGS }).notNull(),
    signedAt: text('signed_at').notNull(),
    algorithm: text('algorithm').notNull(),
    canonicalForm: text('canonical_form').notNull(),
    contentHash: text('content_hash').notNull(),
    signedContent: text('signed_content').notNull(),
    createdAt: createdAt(),
    createdBy: createdBy().references(() => users.id),
  },
  (t) => [uniqueIndex('signatures_finding_unique').on(t.findingId), index('signatures_signer_idx').on(t.signerId)],
);
