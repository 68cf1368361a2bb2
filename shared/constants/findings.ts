/** Enumerations of findings, their review and their signatures, for zod contracts and Drizzle columns alike. */

/** Where a finding stands in review. `returned` goes back to `draft` when its author picks it up again. */
export const FINDING_STATES = ['draft', 'in-review', 'returned', 'approved', 'withdrawn'] as const;
export type FindingState = (typeof FINDING_STATES)[number];

export const FINDING_STATE_LABELS: Record<FindingState, string> = {
  draft: 'Draft',
  'in-review': 'In review',
  returned: 'Returned',
  approved: 'Approved',
  withdrawn: 'Withdrawn',
};

/** What can be done to a finding. Each is checked by `decide` in shared/findings/review.ts. */
export const FINDING_ACTIONS = ['edit', 'attach', 'submit', 'comment', 'return', 'approve', 'reopen', 'withdraw', 'revise'] as const;
export type FindingAction = (typeof FINDING_ACTIONS)[number];

/**
 * What a reviewer's signature means. The signer picks one; it is printed with the signature and is part
 * of the signed content, so it cannot be changed afterwards.
 */
export const SIGNATURE_MEANINGS = ['approved-for-wiki', 'reviewed-no-objection'] as const;
export type SignatureMeaning = (typeof SIGNATURE_MEANINGS)[number];

export const SIGNATURE_MEANING_LABELS: Record<SignatureMeaning, string> = {
  'approved-for-wiki': 'Approved for the shop wiki',
  'reviewed-no-objection': 'Reviewed, no objection',
};

/** Entries of a finding's thread: plain comments, and the events that carry words of their own. */
export const THREAD_ENTRY_KINDS = ['comment', 'submitted', 'returned', 'approved', 'reopened', 'withdrawn'] as const;
export type ThreadEntryKind = (typeof THREAD_ENTRY_KINDS)[number];

/** The hash and the canonical form a signature is computed with; stored with each signature. */
export const SIGNATURE_ALGORITHM = 'SHA-256' as const;
export const CANONICAL_FORM = 'lumenbook-canonical-json-1' as const;
