/** Enumerations of the imports feature, defined once for zod contracts and Drizzle columns alike. */

/**
 * An import's life: uploaded and detected → previewing (a job) → previewed → committing (a job) →
 * committed → undoing (a job) → undone. `failed` keeps the reason of a job that stopped; an undo that stops
 * leaves the import committed, with its reason.
 */
export const IMPORT_STATUSES = ['uploaded', 'previewing', 'previewed', 'committing', 'committed', 'undoing', 'undone', 'failed'] as const;
export type ImportStatus = (typeof IMPORT_STATUSES)[number];

/** What became of one row of the file. */
export const IMPORT_ROW_OUTCOMES = ['accepted', 'skipped', 'problem'] as const;
export type ImportRowOutcome = (typeof IMPORT_ROW_OUTCOMES)[number];

/** Every reason a row is not imported as it stands. */
export const IMPORT_PROBLEM_CODES = [
  'no-tag',
  'unknown-tag',
  'mass-empty',
  'mass-not-a-number',
  'unknown-unit',
  'overload',
  'unstable',
  'duplicate-in-file',
  'existing-reading',
  'impossible-mass',
  'non-positive-mass',
  'control-at-resin-stage',
  'bad-date',
  'sequence-extra-reading',
  'sequence-missing-reading',
] as const;
export type ImportProblemCode = (typeof IMPORT_PROBLEM_CODES)[number];

/** How coupons are found for the readings: by a tag column, or in weighing order along a run's coupon list. */
export const IMPORT_TARGET_MODES = ['tag', 'sequence'] as const;
export type ImportTargetMode = (typeof IMPORT_TARGET_MODES)[number];

/** A coupon that already has a reading at the stage: leave it, or correct it (with one reason for all). */
export const IMPORT_EXISTING_CHOICES = ['skip', 'correct'] as const;
export type ImportExistingChoice = (typeof IMPORT_EXISTING_CHOICES)[number];

/** At commit: import the accepted rows and leave the rest, or import nothing while any problem remains. */
export const IMPORT_COMMIT_CHOICES = ['accepted-only', 'all-or-nothing'] as const;
export type ImportCommitChoice = (typeof IMPORT_COMMIT_CHOICES)[number];

/** The largest file accepted, in bytes. */
export const MAX_IMPORT_BYTES = 50 * 1024 * 1024;
/** Extensions accepted for upload. */
export const IMPORT_EXTENSIONS = ['.csv', '.txt', '.tsv'] as const;
