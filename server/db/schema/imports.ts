import { index, integer, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';
import { IMPORT_PROBLEM_CODES, IMPORT_ROW_OUTCOMES, IMPORT_STATUSES } from '../../../shared/constants/imports';
import { WEIGHING_STAGES } from '../../../shared/constants/records';
import type { ImportColumn, ImportCounts, ImportDetected, ImportMapping, ImportPreviewRow } from '../../../shared/schemas/imports';
import { users } from './auth';
import { createdAt, createdBy, id } from './columns';

/**
 * One uploaded file of readings: the file (kept under DATA_DIR/imports by its SHA-256), what detection
 * found, the mapping last previewed or committed, counts, and its state. Undo marks the row, never
 * removes it.
 */
export const imports = sqliteTable(
  'imports',
  {
    id: id(),
    originalName: text('original_name').notNull(),
    /** The stored file's name under DATA_DIR/imports. */
    fileName: text('file_name').notNull(),
    sha256: text('sha256').notNull(),
    bytes: integer('bytes').notNull(),
    status: text('status', { enum: IMPORT_STATUSES }).notNull().default('uploaded'),
    /** Same header and separator → same key, so saved mappings can be offered. */
    shapeKey: text('shape_key').notNull(),
    detected: text('detected', { mode: 'json' }).$type<ImportDetected>().notNull(),
    /** The head of the file as read with the detected format: column guesses and the first rows. */
    sample: text('sample', { mode: 'json' }).$type<{ columns: ImportColumn[]; sampleRows: string[][] }>().notNull(),
    mapping: text('mapping', { mode: 'json' }).$type<ImportMapping>(),
    stage: text('stage', { enum: WEIGHING_STAGES }),
    counts: text('counts', { mode: 'json' }).$type<ImportCounts>(),
    previewRows: text('preview_rows', { mode: 'json' }).$type<ImportPreviewRow[]>(),
    /** Existing weighings this import corrected: the old row and the row that replaced it. */
    corrections: text('corrections', { mode: 'json' }).$type<{ oldId: number; newId: number }[]>(),
    error: text('error'),
    committedAt: text('committed_at'),
    committedBy: integer('committed_by').references(() => users.id),
    undoneAt: text('undone_at'),
    undoneBy: integer('undone_by').references(() => users.id),
    undoReason: text('undo_reason'),
    createdAt: createdAt(),
    createdBy: createdBy().references(() => users.id),
  },
  (t) => [
    index('imports_sha_idx').on(t.sha256),
    index('imports_status_idx').on(t.status),
    index('imports_created_idx').on(t.createdAt, t.id),
    index('imports_shape_idx').on(t.shapeKey),
  ],
);

/** Every row of a file that was not imported as it stands, with its row number, column and reason. */
export const importProblems = sqliteTable(
  'import_problems',
  {
    id: id(),
    importId: integer('import_id')
      .notNull()
      .references(() => imports.id),
    row: integer('row').notNull(),
    column: text('column'),
    code: text('code', { enum: IMPORT_PROBLEM_CODES }).notNull(),
    outcome: text('outcome', { enum: IMPORT_ROW_OUTCOMES }).notNull(),
    message: text('message').notNull(),
    suggestions: text('suggestions', { mode: 'json' }).$type<string[]>().notNull(),
    cells: text('cells', { mode: 'json' }).$type<string[]>().notNull(),
  },
  (t) => [index('import_problems_import_idx').on(t.importId, t.row)],
);

/** A named mapping for the files one scale writes, offered first for files of the same shape. */
export const importPresets = sqliteTable(
  'import_presets',
  {
    id: id(),
    name: text('name').notNull(),
    shapeKey: text('shape_key').notNull(),
    mapping: text('mapping', { mode: 'json' }).$type<ImportMapping>().notNull(),
    createdAt: createdAt(),
    createdBy: createdBy().references(() => users.id),
  },
  (t) => [uniqueIndex('import_presets_name_unique').on(t.name), index('import_presets_shape_idx').on(t.shapeKey)],
);
