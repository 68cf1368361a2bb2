import fs from 'node:fs';
import path from 'node:path';
import type { Request, Response } from 'express';
import type { FeatureDeps } from '../../deps';
import { writeAudit } from '../../db/audit';
import { AppError, Conflict, NotFound, Unprocessable } from '../../http/errors';
import { createMeasurements, type ReadingProblem } from '../../measurements/measurements';
import type { User } from '../../../shared/schemas/auth';
import type { ImportStatus } from '../../../shared/constants/imports';
import type {
  CommitImportInput,
  CreatePresetInput,
  ImportColumn,
  ImportDetail,
  ImportFormat,
  ImportList,
  ImportMapping,
  ImportProblem,
  ImportProblems,
  ImportSummary,
} from '../../../shared/schemas/imports';
import type { ListQuery } from '../../../shared/schemas/common';
import { detectSample, formatOf, sampleLines, viewSample } from '../../../shared/imports/detect';
import { binaryReason, detectEncoding } from '../../../shared/imports/encoding';
import { toSafeCsv } from '../../../shared/imports/csv-safety';
import { shapeKey } from '../../../shared/imports/template';
import { decode, readHead, streamRows } from './file-reader';
import {
  allPresets,
  committedWithSha,
  countFileUses,
  findImport,
  findPresetByName,
  importWithNames,
  insertImport,
  insertPreset,
  listImports,
  markStaleJobsFailed,
  presetsForShape,
  problemsOf,
  replaceProblems,
  tagsAmong,
  updateImport,
  type CouponKey,
  type ImportRow,
} from './imports.repo';
import { createReceiver } from './upload';
import { collectReadings, finishProblems as finishProblemsOf } from './collect';
import { writeUndo } from './undo';
import { blockedMessage, entryOf, MAX_PROBLEMS, previewRowsOf, refusal, writeCommit, type Analysis, type Collected, type CommitJob } from './commit';

/** Readings judged by the measurements module per step; the event loop gets a turn between steps. */
const JUDGE_CHUNK = 5_000;
/** How long a preview's collected readings are kept for its commit (the file cannot change; coupons can). */
const COLLECTED_TTL_MS = 15 * 60 * 1000;

const yieldToLoop = () => new Promise<void>((resolve) => setImmediate(resolve));

export function createImportsService(deps: FeatureDeps) {
  const { db } = deps.database;
  const measurements = createMeasurements({ now: deps.now });
  const dir = path.join(deps.config.dataDir, 'imports');
  const receive = createReceiver(dir);
  const jobs = new Map<number, { progress: number }>();
  /** Who waits for an import's job to end (`detail` with a wait): called when it has. */
  const waiters = new Map<number, Set<() => void>>();
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

  /**
   * The detail once the running job has ended, or after `waitMs`, whichever comes first; at once when no
   * job runs. The job's own status write comes before its end is told, so the answer shows the outcome.
   */
  async function detailAfterJob(id: number, waitMs: number): Promise<ImportDetail> {
    if (waitMs > 0 && jobs.has(id)) {
      await new Promise<void>((resolve) => {
        let set = waiters.get(id);
        if (!set) {
          set = new Set();
          waiters.set(id, set);
        }
        const wake = () => {
          clearTimeout(timer);
          set.delete(wake);
          resolve();
        };
        const timer = setTimeout(wake, waitMs);
        timer.unref();
        set.add(wake);
      });
    }
    return detail(id);
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
    const view = viewSample(sampleLines(decode(head, format.encoding), truncated), format, (values) => tagsAmong(db, values));
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
      const { detected, view } = detectSample(text, enc, truncated, (values) => tagsAmong(db, values));
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
   * A preview's collected readings and judgement, kept for the commit that follows with the same mapping:
   * the commit then neither reads the file nor judges it again before its transaction (which judges
   * every reading once more, on the state it writes).
   */
  interface Kept {
    key: string;
    at: number;
    collected: Collected;
    analysis: Analysis;
    problems: ImportProblem[];
  }
  const keptCache = new Map<number, Kept>();
  function keep(id: number, mapping: ImportMapping, v: Omit<Kept, 'key' | 'at'>) {
    keptCache.clear(); // one at a time: a big file's readings are a few MB, never many of them
    keptCache.set(id, { key: JSON.stringify(mapping), at: Date.now(), ...v });
  }
  function takeKept(id: number, mapping: ImportMapping): Kept | null {
    const hit = keptCache.get(id);
    keptCache.delete(id);
    return hit && hit.key === JSON.stringify(mapping) && Date.now() - hit.at < COLLECTED_TTL_MS ? hit : null;
  }

  /**
   * Reads every row of the file through the mapping (streaming) and collects what the measurements
   * module will be asked to write (collect.ts).
   */
  function collect(r: ImportRow, mapping: ImportMapping, onProgress: (f: number) => void): Promise<Collected> {
    return collectReadings(db, path.join(dir, r.fileName), r, mapping, onProgress);
  }

  /** Sorts problems by row and fills in the cells of those found after the file was read (collect.ts). */
  function finishProblems(r: ImportRow, mapping: ImportMapping, problems: ImportProblem[]): Promise<ImportProblem[]> {
    return finishProblemsOf(path.join(dir, r.fileName), mapping, problems);
  }

  /**
   * Asks the measurements module about every collected reading, JUDGE_CHUNK at a time with a turn of
   * the event loop between (reads only: the rules are judged again, all at once, inside the commit's
   * transaction). Each coupon appears once after the duplicates are dropped (drying checks, which may
   * repeat, have no rule between them), so judging in chunks answers what judging all at once would.
   */
  async function judge(mapping: ImportMapping, c: Collected, judgedAt: number, onProgress: (f: number) => void): Promise<Analysis> {
    const a: Analysis = {
      counts: { rows: c.dataRows, accepted: 0, corrections: 0, skipped: c.skippedRows, problems: c.problemRows },
      problems: [...c.problems],
      accepted: [],
      corrections: [],
      previewRows: [],
      judgedAt,
    };
    const live: number[] = [];
    for (let i = 0; i < c.row.length; i++) {
      const later = c.replacedBy[i] as number;
      if (later === 0) {
        live.push(i);
        continue;
      }
      a.counts.skipped++;
      if (a.problems.length < MAX_PROBLEMS) {
        a.problems.push({
          row: c.row[i] as number,
          column: null,
          code: 'duplicate-in-file',
          outcome: 'skipped',
          message: `${(c.coupon[i] as CouponKey).tag} is weighed again at row ${later}; the later reading is kept`,
          suggestions: [],
          cells: [],
        });
      }
    }
    for (let from = 0; from < live.length; from += JUDGE_CHUNK) {
      const part = live.slice(from, from + JUDGE_CHUNK);
      const known = new Map<number, CouponKey>();
      for (const i of part) known.set((c.coupon[i] as CouponKey).id, c.coupon[i] as CouponKey);
      const refused = measurements.checkBulk(
        db,
        part.map((i) => entryOf(mapping, c, i)),
        known,
      );
      const refusedAt = new Map<number, ReadingProblem>();
      for (const p of refused) if (!refusedAt.has(p.entry)) refusedAt.set(p.entry, p);
      part.forEach((i, j) => {
        const p = refusedAt.get(j);
        if (p) refusal(a, mapping, c, i, p);
        else a.accepted.push(i);
      });
      onProgress(Math.min(1, (from + part.length) / live.length));
      await yieldToLoop();
    }
    a.counts.accepted = a.accepted.length;
    a.previewRows = previewRowsOf(mapping, c, a);
    return a;
  }

  function beginJob(r: ImportRow, status: ImportStatus, mapping: ImportMapping) {
    if (r.status === 'previewing' || r.status === 'committing' || r.status === 'undoing')
      throw new Conflict('This import is being processed; wait for it to finish');
    if (r.status === 'committed' || r.status === 'undone') throw new Conflict(`This import was already ${r.status}; upload the file again to import it anew`);
    updateImport(db, r.id, { status, mapping, stage: mapping.stage, error: null });
    jobs.set(r.id, { progress: 0 });
  }

  /** A job's failure: the status it leaves the import in, and what it says when the cause is not the user's. */
  const PROCESSING_FAILED = { status: 'failed', message: 'Something went wrong while processing the file; nothing was imported' } as const;

  function runJob(
    id: number,
    work: (progress: (fraction: number) => void) => Promise<void>,
    failure: { status: ImportStatus; message: string } = PROCESSING_FAILED,
  ): void {
    const progress = (f: number) => {
      const j = jobs.get(id);
      if (j) j.progress = Math.min(1, Math.max(j.progress, f));
    };
    void (async () => {
      try {
        await work(progress);
      } catch (err) {
        keptCache.delete(id);
        const message = err instanceof AppError ? err.message : failure.message;
        if (!(err instanceof AppError)) deps.logger.error({ err, importId: id }, 'import job failed');
        updateImport(db, id, { status: failure.status, error: message });
      } finally {
        jobs.delete(id);
        for (const wake of waiters.get(id) ?? []) wake();
        waiters.delete(id);
      }
    })();
  }

  /** Starts the preview job; the client polls the import until its status leaves `previewing`. */
  function preview(id: number, mapping: ImportMapping): ImportDetail {
    const r = requireImport(id);
    beginJob(r, 'previewing', mapping);
    runJob(id, async (progress) => {
      // Read before the coupons' tags and roles are (collect), which the judgement then trusts: a write
      // committed after it (while the file is read, between chunks, or before the commit) moves it.
      const judgedAt = measurements.changeCounter(db);
      const collected = await collect(r, mapping, progress);
      const a = await judge(mapping, collected, judgedAt, (f) => progress(0.8 + f * 0.15));
      const problems = await finishProblems(r, mapping, a.problems);
      db.transaction((tx) => {
        replaceProblems(tx, id, problems);
        updateImport(tx, id, { status: 'previewed', counts: a.counts, previewRows: a.previewRows });
      });
      keep(id, mapping, { collected, analysis: a, problems: [...problems] });
    });
    return detail(id);
  }

  /**
   * What the commit writes: the preview's readings and judgement when kept, else the file read and
   * judged again. Null when all-or-nothing was chosen and problems remain (the import goes back to `previewed`).
   */
  async function commitJob(actor: User, r: ImportRow, input: CommitImportInput, kept: Kept | null, progress: (f: number) => void): Promise<CommitJob | null> {
    const { mapping } = input;
    const id = r.id;
    const judgedAt = measurements.changeCounter(db);
    const collected = kept?.collected ?? (await collect(r, mapping, progress));
    const a = kept?.analysis ?? (await judge(mapping, collected, judgedAt, (f) => progress(0.8 + f * 0.1)));
    const problems = kept?.problems ?? (await finishProblems(r, mapping, a.problems));
    if (input.choice === 'all-or-nothing' && a.counts.problems > 0) {
      db.transaction((tx) => {
        replaceProblems(tx, id, problems);
        updateImport(tx, id, { status: 'previewed', counts: a.counts, previewRows: a.previewRows, error: blockedMessage(a.counts.problems) });
      });
      return null;
    }
    return {
      importId: id,
      actor: { id: actor.id },
      mapping,
      choice: input.choice,
      file: { originalName: r.originalName, sha256: r.sha256 },
      collected,
      analysis: a,
      problems,
    };
  }

  /**
   * Starts the commit job. The readings are collected and judged in chunks while other requests are served
   * (or taken from the preview with the same mapping, if it was the last one and is recent); then ONE
   * transaction on a second connection (`writeCommit`, decision 0017), held open across turns of the event
   * loop, writes every accepted reading through the measurements module's bulk path, which judges them
   * again on exactly the state it writes to when anything changed since the preview (someone may have
   * weighed a coupon meanwhile), or, when the user chose all-or-nothing and a problem remains, writes
   * nothing at all.
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
    // The job first: if its write is refused (another write holds the database), the preview stays kept.
    beginJob(r, 'committing', mapping);
    let kept = takeKept(id, mapping);
    runJob(id, async (progress) => {
      // Reading and judging the file again (no kept preview) is about half the work; the write the rest.
      const share = kept ? 0 : 0.5;
      const job: CommitJob | null = await commitJob(actor, r, input, kept, (f) => progress(f * share));
      kept = null;
      if (!job) return;
      const out = await writeCommit(deps.database.sqlite, measurements, job, deps.now, (f) => progress(share + f * (1 - share)));
      deps.logger.info({ importId: id, status: out.status, judgedAgain: out.judgedAgain }, 'import commit written');
    });
    return detail(id);
  }

  /**
   * Starts the undo job of a committed import (the client polls it until its status leaves `undoing`): its
   * current weighings are soft-deleted through the measurements module (kept, never removed; one audit
   * entry per coupon) and the readings it corrected get their earlier values back as new corrections; the
   * audit log names who, when and why. Written as the commit is (`writeUndo`, decision 0017): one
   * transaction on a second connection, a slice at a time while other requests are served. On a failure
   * nothing is changed and the import is `committed` again, saying why.
   */
  function undo(actor: User, id: number, reason: string): ImportDetail {
    const r = requireImport(id);
    if (r.status === 'undoing') throw new Conflict('This import is being undone; wait for it to finish');
    if (r.status !== 'committed') throw new Conflict(r.status === 'undone' ? 'This import was already undone' : 'Only a committed import can be undone');
    updateImport(db, id, { status: 'undoing', error: null });
    jobs.set(id, { progress: 0 });
    runJob(
      id,
      async (progress) => {
        await writeUndo(deps.database.sqlite, measurements, { importId: id, actor: { id: actor.id }, reason }, deps.now, progress);
        deps.logger.info({ importId: id }, 'import undo written');
      },
      { status: 'committed', message: 'Something went wrong while undoing this import; nothing was changed' },
    );
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

  return { upload, sample, detail, detailAfterJob, list, problems, problemsCsv, preview, commit, undo, presets, createPreset };
}
