import { z } from 'zod';
import { IMPORT_COMMIT_CHOICES, IMPORT_EXISTING_CHOICES, IMPORT_PROBLEM_CODES, IMPORT_ROW_OUTCOMES, IMPORT_STATUSES } from '../constants/imports';
import { WEIGHING_STAGES } from '../constants/records';
import { DATE_ORDERS } from '../imports/dates';
import { IMPORT_ENCODINGS } from '../imports/encoding';
import { COLUMN_KINDS, IMPORT_DELIMITERS, LINE_ENDINGS } from '../imports/format';
import { IMPORT_MASS_UNITS } from '../imports/mass-units';
import { DECIMAL_MARKS } from '../imports/reading';
import { listQuerySchema, listResponseSchema } from './common';
import { reasonSchema } from './coupons';

const idSchema = z.number().int().positive();
const columnSchema = z.number().int().min(0).max(199);

/** How the file is read: every detected choice, each of which the user may override. */
export const importFormatSchema = z.strictObject({
  encoding: z.enum(IMPORT_ENCODINGS),
  delimiter: z.enum(IMPORT_DELIMITERS),
  hasHeader: z.boolean(),
  decimal: z.enum(DECIMAL_MARKS),
  dateOrder: z.enum(DATE_ORDERS),
});
export type ImportFormat = z.infer<typeof importFormatSchema>;

const tagTargetSchema = z.strictObject({ mode: z.literal('tag'), tagColumn: columnSchema });
const sequenceTargetSchema = z.strictObject({
  mode: z.literal('sequence'),
  runId: idSchema,
  /** The run's coupons in the order they were weighed. */
  couponIds: z.array(idSchema).min(1, 'Put at least one coupon in the weighing order').max(5000),
});

/** Which column means what, and what to do with the rows. */
export const importMappingSchema = z
  .strictObject({
    format: importFormatSchema,
    target: z.discriminatedUnion('mode', [tagTargetSchema, sequenceTargetSchema]),
    massColumn: columnSchema,
    /** A column naming each row's unit; otherwise `fixedUnit`, unless the reading carries its own. */
    unitColumn: columnSchema.nullable().default(null),
    fixedUnit: z.enum(IMPORT_MASS_UNITS).default('g'),
    dateColumn: columnSchema.nullable().default(null),
    timeColumn: columnSchema.nullable().default(null),
    stabilityColumn: columnSchema.nullable().default(null),
    /** Minutes east of UTC of the scale's clock (the browser's offset when the user maps the file). */
    utcOffsetMinutes: z.number().int().min(-840).max(840).default(0),
    stage: z.enum(WEIGHING_STAGES),
    includeUnstable: z.boolean().default(false),
    existing: z.enum(IMPORT_EXISTING_CHOICES).default('skip'),
    correctionReason: reasonSchema.optional(),
  })
  .refine((m) => m.existing !== 'correct' || m.correctionReason !== undefined, {
    message: 'Say why the existing readings are corrected',
    path: ['correctionReason'],
  });
export type ImportMapping = z.infer<typeof importMappingSchema>;
export type ImportMappingInput = z.input<typeof importMappingSchema>;

export const previewImportSchema = z.strictObject({ mapping: importMappingSchema });
export type PreviewImportInput = z.infer<typeof previewImportSchema>;

export const commitImportSchema = z.strictObject({
  mapping: importMappingSchema,
  choice: z.enum(IMPORT_COMMIT_CHOICES).default('accepted-only'),
  /** Import a file whose SHA-256 was imported before. */
  again: z.boolean().default(false),
});
export type CommitImportInput = z.infer<typeof commitImportSchema>;

export const undoImportSchema = z.strictObject({ reason: reasonSchema });
export type UndoImportInput = z.infer<typeof undoImportSchema>;

export const sampleImportSchema = z.strictObject({ format: importFormatSchema });
export type SampleImportInput = z.infer<typeof sampleImportSchema>;

export const importColumnSchema = z.object({
  index: z.number().int(),
  name: z.string(),
  kind: z.enum(COLUMN_KINDS),
  share: z.number(),
  examples: z.array(z.string()),
});
export type ImportColumn = z.infer<typeof importColumnSchema>;

const choiceReason = <T extends z.ZodType>(value: T) => z.object({ value, reason: z.string(), assumed: z.boolean() });

/** What detection found, each choice with the reason it was made. */
export const importDetectedSchema = z.object({
  encoding: choiceReason(z.enum(IMPORT_ENCODINGS)),
  delimiter: choiceReason(z.enum(IMPORT_DELIMITERS)),
  hasHeader: choiceReason(z.boolean()),
  decimal: choiceReason(z.enum(DECIMAL_MARKS)),
  dateOrder: choiceReason(z.enum(DATE_ORDERS)),
  lineEnding: z.enum(LINE_ENDINGS),
  suggested: z.object({
    tagColumn: z.number().int().nullable(),
    massColumn: z.number().int().nullable(),
    unitColumn: z.number().int().nullable(),
    dateColumn: z.number().int().nullable(),
    timeColumn: z.number().int().nullable(),
    stabilityColumn: z.number().int().nullable(),
  }),
  /** A unit every sampled reading carries, if they agree. */
  unitInReading: z.enum(IMPORT_MASS_UNITS).nullable(),
  /** Sampled rows have a stability flag inside the reading. */
  stabilityInReading: z.boolean(),
});
export type ImportDetected = z.infer<typeof importDetectedSchema>;

export const importProblemSchema = z.object({
  row: z.number().int(),
  column: z.string().nullable(),
  code: z.enum(IMPORT_PROBLEM_CODES),
  outcome: z.enum(IMPORT_ROW_OUTCOMES),
  message: z.string(),
  suggestions: z.array(z.string()),
  /** The row's cells, as text, for showing beside the reason. */
  cells: z.array(z.string()),
});
export type ImportProblem = z.infer<typeof importProblemSchema>;

export const importCountsSchema = z.object({
  rows: z.number().int(),
  accepted: z.number().int(),
  corrections: z.number().int(),
  skipped: z.number().int(),
  problems: z.number().int(),
});
export type ImportCounts = z.infer<typeof importCountsSchema>;

/** A row as it will be stored (mass in grams; the client shows it in the user's unit). */
export const importPreviewRowSchema = z.object({
  row: z.number().int(),
  couponId: z.number().int(),
  tag: z.string(),
  stage: z.enum(WEIGHING_STAGES),
  massG: z.number(),
  measuredAt: z.string(),
  correction: z.boolean(),
});
export type ImportPreviewRow = z.infer<typeof importPreviewRowSchema>;

export const importSummarySchema = z.object({
  id: z.number().int(),
  originalName: z.string(),
  sha256: z.string(),
  bytes: z.number().int(),
  status: z.enum(IMPORT_STATUSES),
  stage: z.enum(WEIGHING_STAGES).nullable(),
  counts: importCountsSchema.nullable(),
  /** 0–1 while a job runs. */
  progress: z.number(),
  error: z.string().nullable(),
  createdAt: z.string(),
  createdBy: z.number().int().nullable(),
  createdByName: z.string().nullable(),
  committedAt: z.string().nullable(),
  undoneAt: z.string().nullable(),
  undoneByName: z.string().nullable(),
  undoReason: z.string().nullable(),
});
export type ImportSummary = z.infer<typeof importSummarySchema>;

export const importDetailSchema = importSummarySchema.extend({
  detected: importDetectedSchema,
  columns: z.array(importColumnSchema),
  sampleRows: z.array(z.array(z.string())),
  mapping: importMappingSchema.nullable(),
  previewRows: z.array(importPreviewRowSchema),
  /** Earlier committed imports of a file with the same SHA-256. */
  sameFile: z.array(z.object({ id: z.number().int(), createdAt: z.string(), status: z.enum(IMPORT_STATUSES) })),
  /** Saved mappings for files of this shape, best first. */
  presets: z.array(z.object({ id: z.number().int(), name: z.string(), mapping: importMappingSchema })),
});
export type ImportDetail = z.infer<typeof importDetailSchema>;

export const importUploadResponseSchema = importDetailSchema;

export const importListQuerySchema = listQuerySchema;
export const importListSchema = listResponseSchema(importSummarySchema);
export type ImportList = z.infer<typeof importListSchema>;

/**
 * `wait`: while a job runs (preview, commit, undo), answer when it ends or after this many ms, whichever
 * comes first, instead of at once: a poller sees the end the moment it comes, and asks far less often.
 */
export const IMPORT_WAIT_MAX_MS = 10_000;
export const importDetailQuerySchema = z.object({ wait: z.coerce.number().int().min(0).max(IMPORT_WAIT_MAX_MS).optional() });

export const importProblemsQuerySchema = listQuerySchema.extend({ pageSize: z.coerce.number().int().min(1).max(500).default(100) });
export const importProblemsSchema = listResponseSchema(importProblemSchema);
export type ImportProblems = z.infer<typeof importProblemsSchema>;

export const importSampleResponseSchema = z.object({ columns: z.array(importColumnSchema), sampleRows: z.array(z.array(z.string())) });

export const createPresetSchema = z.strictObject({
  name: z.string().trim().min(1, 'Name the preset').max(80),
  importId: idSchema,
  mapping: importMappingSchema,
});
export type CreatePresetInput = z.infer<typeof createPresetSchema>;

/** A saved column mapping, offered again for files of the same shape. */
export const importPresetSchema = z.object({ id: z.number().int(), name: z.string(), mapping: importMappingSchema });
export const importPresetListSchema = z.object({ items: z.array(importPresetSchema.extend({ createdAt: z.string() })) });
export const importPresetResponseSchema = z.object({ preset: importPresetSchema });
