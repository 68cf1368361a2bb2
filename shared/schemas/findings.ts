import { z } from 'zod';
import { CANONICAL_FORM, FINDING_ACTIONS, FINDING_STATES, SIGNATURE_ALGORITHM, SIGNATURE_MEANINGS, THREAD_ENTRY_KINDS } from '../constants/findings';
import { listQuerySchema, listResponseSchema } from './common';

export const TITLE_MAX = 200;
export const BODY_MAX = 50_000;
export const COMMENT_MAX = 10_000;

const title = z.string({ error: 'Give the finding a title' }).trim().min(1, 'Give the finding a title').max(TITLE_MAX, `Use at most ${TITLE_MAX} characters`);
const bodyMd = z.string({ error: 'The body is Markdown text' }).max(BODY_MAX, `Use at most ${BODY_MAX} characters`);
const ids = (what: string) =>
  z
    .array(z.number().int().positive(`Each ${what} is an id`), { error: `${what}s are a list of ids` })
    .max(50, `At most 50 ${what}s`)
    .refine((l) => new Set(l).size === l.length, `A ${what} appears twice`);

const contentFields = {
  title,
  bodyMd,
  trialIds: ids('trial'),
  speciesIds: ids('species'),
  resinIds: ids('resin'),
};

export const createFindingSchema = z.strictObject({
  title: contentFields.title,
  bodyMd: contentFields.bodyMd.default(''),
  trialIds: contentFields.trialIds.default([]),
  speciesIds: contentFields.speciesIds.default([]),
  resinIds: contentFields.resinIds.default([]),
});
export type CreateFindingInput = z.infer<typeof createFindingSchema>;

/**
 * Autosave. `baseRevision` is the revision the writer's screen shows; when someone else saved since,
 * the answer is 409 rather than a silent overwrite.
 */
export const updateFindingSchema = z.strictObject({
  baseRevision: z.number({ error: 'baseRevision is the revision being edited' }).int().min(1),
  title: contentFields.title.optional(),
  bodyMd: contentFields.bodyMd.optional(),
  trialIds: contentFields.trialIds.optional(),
  speciesIds: contentFields.speciesIds.optional(),
  resinIds: contentFields.resinIds.optional(),
});
export type UpdateFindingInput = z.infer<typeof updateFindingSchema>;

export const attachEvidenceSchema = z.strictObject({
  savedViewId: z.number({ error: 'Pick a saved view' }).int().positive('Pick a saved view'),
});
export type AttachEvidenceInput = z.infer<typeof attachEvidenceSchema>;

export const evidenceParamsSchema = z.strictObject({
  id: z.coerce.number().int().positive(),
  evidenceId: z.coerce.number().int().positive(),
});

export const commentSchema = z.strictObject({
  bodyMd: z.string({ error: 'Write a comment' }).trim().min(1, 'Write a comment').max(COMMENT_MAX, `Use at most ${COMMENT_MAX} characters`),
});
export type CommentInput = z.infer<typeof commentSchema>;

export const returnFindingSchema = z.strictObject({
  reason: z.string({ error: 'Say why it goes back' }).trim().min(1, 'Say why it goes back').max(COMMENT_MAX, `Use at most ${COMMENT_MAX} characters`),
});
export type ReturnFindingInput = z.infer<typeof returnFindingSchema>;

export const approveFindingSchema = z.strictObject({
  password: z.string({ error: 'Enter your password to sign' }).min(1, 'Enter your password to sign').max(200),
  meaning: z.enum(SIGNATURE_MEANINGS, { error: 'Pick what your signature means' }),
});
export type ApproveFindingInput = z.infer<typeof approveFindingSchema>;

export const findingListQuerySchema = listQuerySchema.extend({
  state: z.enum(FINDING_STATES).optional(),
  mine: z.enum(['true', 'false']).optional(),
});
export type FindingListQuery = z.infer<typeof findingListQuerySchema>;

export const revisionParamsSchema = z.strictObject({
  id: z.coerce.number().int().positive(),
  revision: z.coerce.number().int().positive(),
});

// ---- answers ----

const person = z.object({ id: z.number().int(), name: z.string() });
const named = z.object({ id: z.number().int(), name: z.string() });

export const evidenceSchema = z.object({
  id: z.number().int(),
  position: z.number().int(),
  savedViewId: z.number().int().nullable(),
  title: z.string(),
  kind: z.string(),
  /** The saved view's numbers, filters and plot data as they were when attached; never changes afterwards. */
  snapshot: z.record(z.string(), z.unknown()),
  /** The plot drawn from the snapshot, sanitised SVG markup, or null when the view has no plot. */
  svg: z.string().nullable(),
  attachedAt: z.string(),
  attachedBy: person,
});
export type Evidence = z.infer<typeof evidenceSchema>;

export const threadEntrySchema = z.object({
  id: z.number().int(),
  kind: z.enum(THREAD_ENTRY_KINDS),
  author: person,
  /** Sanitised HTML rendered from the Markdown on the server. */
  bodyHtml: z.string(),
  bodyMd: z.string(),
  createdAt: z.string(),
});
export type ThreadEntry = z.infer<typeof threadEntrySchema>;

export const signatureSchema = z.object({
  id: z.number().int(),
  signer: person,
  /** The signer's name as printed at signing; it stays as it was if the account is renamed later. */
  signerName: z.string(),
  meaning: z.enum(SIGNATURE_MEANINGS),
  meaningLabel: z.string(),
  signedAt: z.string(),
  algorithm: z.literal(SIGNATURE_ALGORITHM),
  canonicalForm: z.literal(CANONICAL_FORM),
  contentHash: z.string(),
});
export type Signature = z.infer<typeof signatureSchema>;

export const verificationSchema = z.object({
  status: z.enum(['intact', 'altered']),
  checkedAt: z.string(),
  signedHash: z.string(),
  /** Hash recomputed from the finding's rows. */
  findingHash: z.string(),
  /** Hash recomputed from the wiki page's rows, when the finding was published. */
  pageHash: z.string().nullable(),
  /** Where the current content differs from what was signed, e.g. "finding: bodyMd", "page: evidence[0].snapshot". */
  differences: z.array(z.string()),
});
export type Verification = z.infer<typeof verificationSchema>;

export const revisionSummarySchema = z.object({
  revision: z.number().int(),
  editor: person,
  savedAt: z.string(),
  title: z.string(),
});
export type RevisionSummary = z.infer<typeof revisionSummarySchema>;

export const revisionSchema = revisionSummarySchema.extend({
  bodyMd: z.string(),
  bodyHtml: z.string(),
  trialIds: z.array(z.number().int()),
  speciesIds: z.array(z.number().int()),
  resinIds: z.array(z.number().int()),
});
export type Revision = z.infer<typeof revisionSchema>;

export const findingSchema = z.object({
  id: z.number().int(),
  /** The id of the first version; every version of the same finding shares it. */
  seriesId: z.number().int(),
  version: z.number().int(),
  state: z.enum(FINDING_STATES),
  title: z.string(),
  bodyMd: z.string(),
  bodyHtml: z.string(),
  trials: z.array(z.object({ id: z.number().int(), code: z.string(), title: z.string() })),
  species: z.array(named),
  resins: z.array(named),
  author: person,
  editors: z.array(person),
  /** The latest saved revision of the content; autosave sends it back as `baseRevision`. */
  revision: z.number().int(),
  savedAt: z.string(),
  createdAt: z.string(),
  submittedAt: z.string().nullable(),
  evidence: z.array(evidenceSchema),
  thread: z.array(threadEntrySchema),
  signature: signatureSchema.nullable(),
  wikiSlug: z.string().nullable(),
  previousVersion: z.object({ id: z.number().int(), version: z.number().int() }).nullable(),
  nextVersion: z.object({ id: z.number().int(), version: z.number().int(), state: z.enum(FINDING_STATES) }).nullable(),
  /** What the asking user may do now, from the shared review rules. */
  actions: z.array(z.enum(FINDING_ACTIONS)),
});
export type Finding = z.infer<typeof findingSchema>;

export const findingResponseSchema = z.object({ finding: findingSchema });

export const findingListItemSchema = findingSchema.pick({
  id: true,
  seriesId: true,
  version: true,
  state: true,
  title: true,
  author: true,
  savedAt: true,
  createdAt: true,
  wikiSlug: true,
  species: true,
  resins: true,
});
export type FindingListItem = z.infer<typeof findingListItemSchema>;
export const findingListSchema = listResponseSchema(findingListItemSchema);
export type FindingList = z.infer<typeof findingListSchema>;

export const revisionListSchema = z.object({ items: z.array(revisionSummarySchema) });

/** Saved views a finding may attach, as the findings feature reads them. */
export const attachableViewSchema = z.object({
  id: z.number().int(),
  title: z.string(),
  kind: z.string(),
  createdAt: z.string(),
  createdBy: person,
});
export const attachableViewListSchema = z.object({ items: z.array(attachableViewSchema) });
export type AttachableView = z.infer<typeof attachableViewSchema>;

export const revisionResponseSchema = z.object({ revision: revisionSchema });
export const verificationResponseSchema = z.object({ verification: verificationSchema });
