import fs from 'node:fs';
import path from 'node:path';
import type { Request, Response } from 'express';
import type { FeatureDeps } from '../../deps';
import type { Db } from '../../db/client';
import { writeAudit } from '../../db/audit';
import { AppError, Conflict, NotFound, Unprocessable } from '../../http/errors';
import { createMeasurements, type MeasurementEntry, type ReadingProblem } from '../../measurements/measurements';
import type { User } from '../../../shared/schemas/auth';
import type { ImportProblemCode, ImportRowOutcome, ImportStatus } from '../../../shared/constants/imports';
import type {
  CommitImportInput,
  CreatePresetInput,
  ImportColumn,
  ImportCounts,
  ImportDetail,
  ImportFormat,
  ImportList,
  ImportMapping,
  ImportPreviewRow,
  ImportProblem,
  ImportProblems,
  ImportSummary,
} from '../../../shared/schemas/imports';
import type { ListQuery } from '../../../shared/schemas/common';
import { detectSample, formatOf, sampleLines, viewSample } from '../../../shared/imports/detect';
import { binaryReason, detectEncoding } from '../../../shared/imports/encoding';
import { nearestTags } from '../../../shared/imports/levenshtein';
import { readRow, type RowProblem } from '../../../shared/imports/rows';
import { toSafeCsv } from '../../../shared/imports/csv-safety';
import { shapeKey } from '../../../shared/imports/template';
import { decode, readHead, streamRows } from './file-reader';
import {
  allCouponKeys,
  allPresets,
  committedWithSha,
  countFileUses,
  couponKeysByIds,
  currentWeighingAt,
  currentWeighingIdsOfImport,
  findImport,
  findPresetByName,
  findRun,
  findWeighingState,
  importWithNames,
  insertImport,
  insertPreset,
  listImports,
  markStaleJobsFailed,
  presetsForShape,
  problemsOf,
  replaceProblems,
  tagExists,
  updateImport,
  type CouponKey,
  type ImportRow,
} from './imports.repo';
import { createReceiver } from './upload';

/** Rows of the preview shown as they will be stored. */
const PREVIEW_ROWS = 20;
/** Unknown tags for which near matches are searched (each search walks every tag). */
const MAX_SUGGESTION_SEARCHES = 500;

interface Candidate {
  row: number;
  couponId: number;
  tag: string;
  massG: number;
  measuredAt: string;
  cells: string[];
  /** Row number of a later reading of the same coupon and stage, which replaces this one. */
  replacedBy?: number;
}

interface Analysis {
  counts: ImportCounts;
  problems: ImportProblem[];
  accepted: Candidate[];
  corrections: Candidate[];
  previewRows: ImportPreviewRow[];
}

const clipCells = (cells: string[]) => cells.slice(0, 30).map((c) => (c.length > 200 ? `${c.slice(0, 200)}…` : c));

/** What the measurements module refused, as one of the import's problem classes. */
function classify(p: ReadingProblem): ImportProblemCode {
  if (p.code === 'conflict') return 'existing-reading';
  if (p.field === 'stage') return 'control-at-resin-stage';
  if (p.field === 'massG') return 'impossible-mass';
  return 'impossible-mass';
}

export function createImportsService(deps: FeatureDeps) {
  const { db } = deps.database;
  const measurements = createMeasurements({ now: deps.now });
  const dir = path.join(deps.config.dataDir, 'imports');
  const receive = createReceiver(dir);
  const jobs = new Map<number, { progress: number }>();
  markStaleJobsFailed(db);

  function requireImport(id: number): ImportRow {
    const row = findImport(db, id);
    if (!row) throw new NotFound('Import');
    return row;
  }

  function summaryOf(v: { row: ImportRow; createdByName: string | null; undoneByName: string | null }): ImportSummary {
    const r = v.row;
    const job = jobs.get(r.id);
    return {
      id: r.id,
      originalName: r.originalName,
      sha256: r.sha256,
      bytes: r.bytes,
      status: r.status,
      stage: r.stage,
      counts: r.counts,
      progress: job ? job.progress : r.status === 'uploaded' ? 0 : 1,
      error: r.error,
      createdAt: r.createdAt,
      createdBy: r.createdBy,
      createdByName: v.createdByName,
      committedAt: r.committedAt,
      undoneAt: r.undoneAt,
      undoneByName: v.undoneByName,
      undoReason: r.undoReason,
    };
  }

  function detail(id: number): ImportDetail {
    const v = importWithNames(db, id);
    if (!v) throw new NotFound('Import');
    const r = v.row;
    return {
      ...summaryOf(v),
      detected: r.detected,
      columns: r.sample.columns,
      sampleRows: r.sample.sampleRows,
      mapping: r.mapping,
      previewRows: r.previewRows ?? [],
      sameFile: committedWithSha(db, r.sha256, r.id),
      presets: presetsForShape(db, r.shapeKey).map((p) => ({ id: p.id, name: p.name, mapping: p.mapping })),
    };
  }

  function list(q: ListQuery): ImportList {
    const { rows, total } = listImports(db, q.pageSize, (q.page - 1) * q.pageSize);
    return { items: rows.map(summaryOf), page: q.page, pageSize: q.pageSize, total };
  }

  function problems(id: number, q: ListQuery): ImportProblems {
    requireImport(id);
    const { items, total } = problemsOf(db, id, q.pageSize, (q.page - 1) * q.pageSize);
    return {
      items: items.map((p) => ({
        row: p.row,
        column: p.column,
        code: p.code,
        outcome: p.outcome,
        message: p.message,
        suggestions: p.suggestions,
        cells: p.cells,
      })),
      page: q.page,
      pageSize: q.pageSize,
      total,
    };
  }

  /**
   * Every explained row as CSV, for fixing the file in a spreadsheet. Cells come from the user's file,
   * so each text cell that a spreadsheet would run as a formula is neutralised.
   */
  function problemsCsv(id: number): string {
    requireImport(id);
    const { items } = problemsOf(db, id, 1_000_000, 0);
    return toSafeCsv([
      ['row', 'column', 'outcome', 'problem', 'reason', 'cells'],
      ...items.map((p) => [p.row, p.column ?? '', p.outcome, p.code, p.message, p.cells.join(' | ')]),
    ]);
  }

  /** Reads the head of the stored file with a format and answers its columns and first rows. */
  async function sampleWith(file: string, format: ImportFormat): Promise<{ columns: ImportColumn[]; sampleRows: string[][] }> {
    const { head, truncated } = await readHead(file);
    const view = viewSample(sampleLines(decode(head, format.encoding), truncated), format, (t) => tagExists(db, t));
    return { columns: view.columns, sampleRows: view.sampleRows };
  }

  async function sample(id: number, format: ImportFormat) {
    const r = requireImport(id);
    return sampleWith(path.join(dir, r.fileName), format);
  }

  /**
   * Receives the file, checks it is a text file of readings, keeps it under DATA_DIR/imports by its
   * SHA-256 and records the import with what detection found. A refused file leaves nothing behind.
   */
  async function upload(actor: User, req: Request, res: Response): Promise<ImportDetail> {
    const file = await receive(req, res);
    let kept: string | null = null;
    try {
      if (file.bytes === 0) throw new Unprocessable('The file is empty', { file: ['The file is empty'] });
      const { head, truncated } = await readHead(file.path);
      const enc = detectEncoding(head);
      const binary = binaryReason(head, enc.encoding);
      if (binary) throw new Unprocessable(binary, { file: [binary] });
      const text = decode(head, enc.encoding);
      if (truncated && !/[\r\n]/.test(text)) {
        const msg = `The first line is longer than ${head.length / 1024} KB. A scale writes short lines of readings; this does not look like one of its files`;
        throw new Unprocessable(msg, { file: [msg] });
      }
      const { detected, view } = detectSample(text, enc, truncated, (t) => tagExists(db, t));
      if (text.trim() === '') throw new Unprocessable('The file holds no text', { file: ['The file holds no text'] });
      // A sample with no complete data row may hide an endless line; reading on finds it (LineTooLong).
      if (view.rows.length === 0 && truncated) await streamRows(file.path, formatOf(detected), () => undefined);
      if (view.rows.length === 0) {
        const msg = 'The file has a header line but no readings below it';
        throw new Unprocessable(msg, { file: [msg] });
      }
      const fileName = `${file.sha256}.upload`;
      kept = path.join(dir, fileName);
      if (fs.existsSync(kept)) fs.rmSync(file.path, { force: true });
      else fs.renameSync(file.path, kept);
      const row = db.transaction((tx) => {
        const r = insertImport(tx, {
          originalName: file.originalName,
          fileName,
          sha256: file.sha256,
          bytes: file.bytes,
          shapeKey: shapeKey(view.header, detected.delimiter.value, view.columns.length),
          detected,
          sample: { columns: view.columns, sampleRows: view.sampleRows },
          createdBy: actor.id,
        });
        writeAudit(tx, {
          actorId: actor.id,
          action: 'upload',
          entity: 'import',
          entityId: r.id,
          after: { originalName: r.originalName, sha256: r.sha256, bytes: r.bytes },
        });
        return r;
      });
      return detail(row.id);
    } catch (e) {
      fs.rmSync(file.path, { force: true });
      if (kept && countFileUses(db, path.basename(kept)) === 0) fs.rmSync(kept, { force: true });
      throw e;
    }
  }

  /**
   * Reads every row of the file through the mapping (streaming) and collects what the measurements
   * module will be asked to write. The coupon-dependent rules are applied later, by the module, in the
   * same synchronous step as the write.
   */
  async function collect(r: ImportRow, mapping: ImportMapping, onProgress: (f: number) => void) {
    const byTag = new Map<string, CouponKey>();
    const byUpper = new Map<string, CouponKey | null>();
    let sequence: CouponKey[] = [];
    if (mapping.target.mode === 'tag') {
      for (const k of allCouponKeys(db)) {
        byTag.set(k.tag, k);
        const u = k.tag.toUpperCase();
        byUpper.set(u, byUpper.has(u) ? null : k);
      }
    } else {
      const run = findRun(db, mapping.target.runId);
      if (!run) throw new Unprocessable(`No run with id ${mapping.target.runId}`, { 'mapping.target.runId': ['No such run'] });
      const keys = new Map(couponKeysByIds(db, mapping.target.couponIds).map((k) => [k.id, k]));
      const missing = mapping.target.couponIds.filter((id) => !keys.has(id));
      if (missing.length)
        throw new Unprocessable(`No coupon with id ${missing[0]}`, { 'mapping.target.couponIds': [`No coupon with id ${missing.join(', ')}`] });
      sequence = mapping.target.couponIds.map((id) => keys.get(id) as CouponKey);
    }
    const ctx = { columnNames: [] as string[], fallbackIso: r.createdAt };
    const problems: ImportProblem[] = [];
    const candidates: Candidate[] = [];
    const lastOf = new Map<number, number>();
    const suggestionCache = new Map<string, string[]>();
    let next = 0;
    let dataRows = 0;
    let seenHeader = !mapping.format.hasHeader;
    const columnName = (i: number) => ctx.columnNames[i] ?? `Column ${i + 1}`;
    const add = (
      row: number,
      cells: string[],
      code: ImportProblemCode,
      column: string | null,
      message: string,
      outcome: ImportRowOutcome,
      suggestions: string[] = [],
    ) => problems.push({ row, column, code, outcome, message, suggestions, cells: clipCells(cells) });

    await streamRows(
      path.join(dir, r.fileName),
      mapping.format,
      ({ row, cells }) => {
        if (!seenHeader) {
          seenHeader = true;
          ctx.columnNames = cells.map((c, i) => c.trim() || `Column ${i + 1}`);
          return;
        }
        dataRows++;
        const read = readRow(cells, mapping, ctx);
        const rowProblems: (RowProblem & { suggestions?: string[] })[] = [...read.problems];
        let coupon: CouponKey | null | undefined;
        if (mapping.target.mode === 'tag' && read.tag) {
          coupon = byTag.get(read.tag) ?? byUpper.get(read.tag.toUpperCase());
          if (!coupon) {
            let s = suggestionCache.get(read.tag);
            if (!s) {
              s = suggestionCache.size < MAX_SUGGESTION_SEARCHES ? nearestTags(read.tag, byTag.keys()) : [];
              suggestionCache.set(read.tag, s);
            }
            const text = read.tag.length > 40 ? `${read.tag.slice(0, 40)}…` : read.tag;
            const message = `No coupon is tagged "${text}"${s.length ? `; did you mean ${s.join(', ')}?` : ''}`;
            rowProblems.unshift({ code: 'unknown-tag', column: columnName(mapping.target.tagColumn), message, suggestions: s });
          }
        }
        if (rowProblems.length) {
          // An unsettled reading is left out, not wrong: the balance usually prints the settled one next.
          const outcome = rowProblems.every((p) => p.code === 'unstable') ? 'skipped' : 'problem';
          for (const p of rowProblems) add(row, cells, p.code, p.column, p.message, outcome, p.suggestions);
          return;
        }
        if (mapping.target.mode === 'sequence') {
          coupon = sequence[next++];
          if (!coupon) {
            add(
              row,
              cells,
              'sequence-extra-reading',
              null,
              `Reading ${next} of the file has no coupon: the weighing order lists ${sequence.length}`,
              'problem',
            );
            return;
          }
        }
        const c = coupon as CouponKey;
        if (mapping.stage !== 'drying-check') {
          const prev = lastOf.get(c.id);
          if (prev !== undefined) (candidates[prev] as Candidate).replacedBy = row;
          lastOf.set(c.id, candidates.length);
        }
        candidates.push({ row, couponId: c.id, tag: c.tag, massG: read.massG as number, measuredAt: read.measuredAt as string, cells });
      },
      (f) => onProgress(f * 0.9),
    );
    if (mapping.target.mode === 'sequence' && next < sequence.length) {
      const left = sequence.slice(next).map((k) => k.tag);
      const msg = `${left.length} coupon${left.length === 1 ? '' : 's'} of the weighing order got no reading: ${left.slice(0, 10).join(', ')}${left.length > 10 ? ', …' : ''}`;
      add(0, [], 'sequence-missing-reading', null, msg, 'problem');
    }
    for (const c of candidates) {
      if (c.replacedBy !== undefined)
        add(c.row, c.cells, 'duplicate-in-file', null, `${c.tag} is weighed again at row ${c.replacedBy}; the later reading is kept`, 'skipped');
    }
    return { dataRows, problems, massColumn: columnName(mapping.massColumn), candidates: candidates.filter((c) => c.replacedBy === undefined) };
  }

  /** Applies the measurements module's rules to the collected rows (inside the caller's transaction). */
  function judge(tx: Db, mapping: ImportMapping, collected: Awaited<ReturnType<typeof collect>>): Analysis {
    const { candidates } = collected;
    const problemsFound = [...collected.problems];
    const entries: MeasurementEntry[] = candidates.map((c) => ({
      couponId: c.couponId,
      weighings: [{ stage: mapping.stage, massG: c.massG, measuredAt: c.measuredAt }],
    }));
    const refused = measurements.checkBulk(tx, entries);
    const refusedAt = new Map<number, ReadingProblem>();
    for (const p of refused) if (!refusedAt.has(p.entry)) refusedAt.set(p.entry, p);
    const accepted: Candidate[] = [];
    const corrections: Candidate[] = [];
    candidates.forEach((c, i) => {
      const p = refusedAt.get(i);
      if (!p) return accepted.push(c);
      const code = classify(p);
      if (code === 'existing-reading') {
        if (mapping.existing === 'correct') return corrections.push(c);
        problemsFound.push({
          row: c.row,
          column: null,
          code,
          outcome: 'skipped',
          message: `${p.message.replace(/; correct that one.*$/, '')}; it is left as it is (choose to correct existing readings, with a reason, to replace it)`,
          suggestions: [],
          cells: clipCells(c.cells),
        });
        return;
      }
      const massCol = code === 'impossible-mass' ? collected.massColumn : null;
      problemsFound.push({ row: c.row, column: massCol, code, outcome: 'problem', message: p.message, suggestions: [], cells: clipCells(c.cells) });
    });
    problemsFound.sort((a, b) => a.row - b.row);
    const rowsWith = (o: ImportRowOutcome) => new Set(problemsFound.filter((p) => p.outcome === o).map((p) => p.row)).size;
    const problemRows = rowsWith('problem');
    const counts: ImportCounts = {
      rows: collected.dataRows,
      accepted: accepted.length,
      corrections: corrections.length,
      skipped: rowsWith('skipped'),
      problems: problemRows,
    };
    const previewRows = [...accepted.map((c) => ({ c, correction: false })), ...corrections.map((c) => ({ c, correction: true }))]
      .sort((a, b) => a.c.row - b.c.row)
      .slice(0, PREVIEW_ROWS)
      .map(({ c, correction }) => ({
        row: c.row,
        couponId: c.couponId,
        tag: c.tag,
        stage: mapping.stage,
        massG: c.massG,
        measuredAt: c.measuredAt,
        correction,
      }));
    return { counts, problems: problemsFound, accepted, corrections, previewRows };
  }

  function beginJob(r: ImportRow, status: ImportStatus, mapping: ImportMapping) {
    if (r.status === 'previewing' || r.status === 'committing') throw new Conflict('This import is being processed; wait for it to finish');
    if (r.status === 'committed' || r.status === 'undone') throw new Conflict(`This import was already ${r.status}; upload the file again to import it anew`);
    updateImport(db, r.id, { status, mapping, stage: mapping.stage, error: null });
    jobs.set(r.id, { progress: 0 });
  }

  function runJob(id: number, work: (progress: (fraction: number) => void) => Promise<void>): void {
    const progress = (f: number) => {
      const j = jobs.get(id);
      if (j) j.progress = Math.min(1, Math.max(j.progress, f));
    };
    void (async () => {
      try {
        await work(progress);
      } catch (err) {
        const message = err instanceof AppError ? err.message : 'Something went wrong while processing the file; nothing was imported';
        if (!(err instanceof AppError)) deps.logger.error({ err, importId: id }, 'import job failed');
        updateImport(db, id, { status: 'failed', error: message });
      } finally {
        jobs.delete(id);
      }
    })();
  }

  /** Starts the preview job; the client polls the import until its status leaves `previewing`. */
  function preview(id: number, mapping: ImportMapping): ImportDetail {
    const r = requireImport(id);
    beginJob(r, 'previewing', mapping);
    runJob(id, async (progress) => {
      const collected = await collect(r, mapping, (f) => progress(f));
      db.transaction((tx) => {
        const a = judge(tx, mapping, collected);
        replaceProblems(tx, id, a.problems);
        updateImport(tx, id, { status: 'previewed', counts: a.counts, previewRows: a.previewRows });
      });
    });
    return detail(id);
  }

  /**
   * Starts the commit job: the file is read again, and in ONE transaction the rules are applied and
   * every accepted reading is written through the measurements module's bulk path (or, when the user
   * chose all-or-nothing and a problem remains, nothing at all).
   */
  function commit(actor: User, id: number, input: CommitImportInput): ImportDetail {
    const r = requireImport(id);
    const earlier = committedWithSha(db, r.sha256, r.id);
    if (earlier.length && !input.again) {
      const first = earlier[0]!;
      const msg = `This file was imported before (import ${first.id}, ${first.createdAt.slice(0, 10)}); ask to import it again if that is what you want`;
      throw new Conflict(msg, { again: [msg] });
    }
    const mapping = input.mapping;
    beginJob(r, 'committing', mapping);
    runJob(id, async (progress) => {
      const collected = await collect(r, mapping, (f) => progress(f));
      const source = `import:${id}` as const;
      let blocked = false;
      db.transaction((tx) => {
        const a = judge(tx, mapping, collected);
        replaceProblems(tx, id, a.problems);
        if (input.choice === 'all-or-nothing' && a.counts.problems > 0) {
          blocked = true;
          updateImport(tx, id, { status: 'previewed', counts: a.counts, previewRows: a.previewRows });
          return;
        }
        if (a.accepted.length) {
          measurements.bulkAdd(
            tx,
            actor,
            source,
            a.accepted.map((c) => ({ couponId: c.couponId, weighings: [{ stage: mapping.stage, massG: c.massG, measuredAt: c.measuredAt }] })),
          );
        }
        const corrections: { oldId: number; newId: number }[] = [];
        for (const c of a.corrections) {
          const current = currentWeighingAt(tx, c.couponId, mapping.stage);
          if (!current) continue;
          const reason = `${mapping.correctionReason ?? 'Corrected by an import'} (import ${id}, row ${c.row})`;
          const out = measurements.correctWeighing(tx, actor, current.id, { massG: c.massG, measuredAt: c.measuredAt, reason });
          corrections.push({ oldId: current.id, newId: out.row.id });
        }
        const committedAt = deps.now().toISOString();
        updateImport(tx, id, {
          status: 'committed',
          counts: a.counts,
          previewRows: a.previewRows,
          corrections,
          committedAt,
          committedBy: actor.id,
          error: null,
        });
        writeAudit(tx, {
          actorId: actor.id,
          action: 'commit',
          entity: 'import',
          entityId: id,
          after: { stage: mapping.stage, counts: a.counts, choice: input.choice },
        });
      });
      if (blocked) {
        const after = requireImport(id);
        updateImport(db, id, {
          error: `${after.counts?.problems ?? 0} rows still have problems, so nothing was imported (you chose nothing until every problem is fixed)`,
        });
      }
    });
    return detail(id);
  }

  /**
   * Undoes a committed import: its current weighings are soft-deleted through the measurements module
   * (kept, never removed) and the readings it corrected get their earlier values back as new
   * corrections; the audit log names who, when and why.
   */
  function undo(actor: User, id: number, reason: string): ImportDetail {
    db.transaction((tx) => {
      const r = findImport(tx, id);
      if (!r) throw new NotFound('Import');
      if (r.status !== 'committed') throw new Conflict(r.status === 'undone' ? 'This import was already undone' : 'Only a committed import can be undone');
      const why = `Import ${id} undone: ${reason}`;
      for (const wid of currentWeighingIdsOfImport(tx, id)) measurements.deleteWeighing(tx, actor, wid, why);
      for (const c of r.corrections ?? []) {
        const now = findWeighingState(tx, c.newId);
        const old = findWeighingState(tx, c.oldId);
        if (now && old && now.supersededBy === null && now.deletedAt === null) {
          measurements.correctWeighing(tx, actor, c.newId, { massG: old.massG, measuredAt: old.measuredAt, reason: why });
        }
      }
      const undoneAt = deps.now().toISOString();
      updateImport(tx, id, { status: 'undone', undoneAt, undoneBy: actor.id, undoReason: reason });
      writeAudit(tx, { actorId: actor.id, action: 'undo', entity: 'import', entityId: id, before: { status: r.status }, after: { status: 'undone' }, reason });
    });
    return detail(id);
  }

  function presets() {
    return { items: allPresets(db).map((p) => ({ id: p.id, name: p.name, mapping: p.mapping, createdAt: p.createdAt })) };
  }

  function createPreset(actor: User, input: CreatePresetInput) {
    const r = requireImport(input.importId);
    if (findPresetByName(db, input.name)) throw new Conflict(`A preset named ${input.name} exists`, { name: ['This name is taken'] });
    const p = insertPreset(db, { name: input.name, shapeKey: r.shapeKey, mapping: input.mapping, createdBy: actor.id });
    return { preset: { id: p.id, name: p.name, mapping: p.mapping } };
  }

  return { upload, sample, detail, list, problems, problemsCsv, preview, commit, undo, presets, createPreset };
}
