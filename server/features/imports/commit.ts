import type { Db } from '../../db/client';
import { writeAudit } from '../../db/audit';
import { AppError, Conflict } from '../../http/errors';
import type { MeasurementEntry, Measurements, ReadingProblem } from '../../measurements/measurements';
import type { ImportProblemCode, ImportRowOutcome } from '../../../shared/constants/imports';
import type { CommitImportInput, ImportCounts, ImportMapping, ImportPreviewRow, ImportProblem } from '../../../shared/schemas/imports';
import { currentWeighingAt, replaceProblems, updateImport, type CouponKey } from './imports.repo';

/** Rows of the preview shown as they will be stored. */
export const PREVIEW_ROWS = 20;
/**
 * Problem entries kept and stored per import (the counts stay exact beyond it): a file where every
 * one of 100,000 rows is wrong is explained by its first rows, not by 100,000 stored explanations.
 */
export const MAX_PROBLEMS = 5_000;

/**
 * The readings a file gives, column by column rather than one object per row (100,000 rows stay a few
 * MB): candidate i is file row `row[i]` for `coupon[i]`. Rows the rules still have to judge. Plain data,
 * so the commit's worker thread receives it as it is.
 */
export interface Collected {
  dataRows: number;
  massColumn: string;
  /** The explained rows found while reading (up to MAX_PROBLEMS entries). */
  problems: ImportProblem[];
  /** Exact counts of rows explained while reading, by outcome. */
  skippedRows: number;
  problemRows: number;
  row: number[];
  coupon: CouponKey[];
  massG: number[];
  measuredAt: string[];
  /** Row of a later reading of the same coupon and stage that replaces this one, else 0. */
  replacedBy: number[];
}

/** The judgement of the collected rows: indexes into Collected, problems and exact counts. */
export interface Analysis {
  counts: ImportCounts;
  problems: ImportProblem[];
  accepted: number[];
  corrections: number[];
  previewRows: ImportPreviewRow[];
  /**
   * The records' change counter read before the judgement began (`measurements.changeCounter`): the
   * commit writes the accepted rows without judging them again when it still reads the same value.
   */
  judgedAt: number;
}

/** What the measurements module refused, as one of the import's problem classes. */
function classify(p: ReadingProblem): ImportProblemCode {
  if (p.code === 'conflict') return 'existing-reading';
  if (p.field === 'stage') return 'control-at-resin-stage';
  return 'impossible-mass';
}

/**
 * Sorts one refusal of the measurements module into the analysis: a coupon that already has the
 * reading becomes a correction (when the user chose to correct) or a skipped row; anything else a problem.
 */
export function refusal(a: Analysis, mapping: ImportMapping, c: Collected, i: number, p: ReadingProblem) {
  const code = classify(p);
  const problem = (outcome: ImportRowOutcome, column: string | null, message: string) => {
    if (outcome === 'skipped') a.counts.skipped++;
    else a.counts.problems++;
    if (a.problems.length < MAX_PROBLEMS) a.problems.push({ row: c.row[i] as number, column, code, outcome, message, suggestions: [], cells: [] });
  };
  if (code === 'existing-reading') {
    if (mapping.existing === 'correct') {
      a.corrections.push(i);
      a.counts.corrections++;
      return;
    }
    problem(
      'skipped',
      null,
      `${p.message.replace(/; correct that one.*$/, '')}; it is left as it is (choose to correct existing readings, with a reason, to replace it)`,
    );
    return;
  }
  problem('problem', code === 'impossible-mass' ? c.massColumn : null, p.message);
}

export const entryOf = (mapping: ImportMapping, c: Collected, i: number): MeasurementEntry => ({
  couponId: (c.coupon[i] as CouponKey).id,
  weighings: [{ stage: mapping.stage, massG: c.massG[i] as number, measuredAt: c.measuredAt[i] as string }],
});

export function previewRowsOf(mapping: ImportMapping, c: Collected, a: Analysis): ImportPreviewRow[] {
  const corrections = new Set(a.corrections);
  return [...a.accepted.slice(0, PREVIEW_ROWS), ...a.corrections.slice(0, PREVIEW_ROWS)]
    .sort((x, y) => x - y)
    .slice(0, PREVIEW_ROWS)
    .map((i) => ({
      row: c.row[i] as number,
      couponId: (c.coupon[i] as CouponKey).id,
      tag: (c.coupon[i] as CouponKey).tag,
      stage: mapping.stage,
      massG: c.massG[i] as number,
      measuredAt: c.measuredAt[i] as string,
      correction: corrections.has(i),
    }));
}

export const blockedMessage = (n: number) => `${n} rows still have problems, so nothing was imported (you chose nothing until every problem is fixed)`;

/** Everything the commit's transaction works from: plain data, posted to the worker thread that writes it. */
export interface CommitJob {
  importId: number;
  actor: { id: number };
  mapping: ImportMapping;
  choice: CommitImportInput['choice'];
  file: { originalName: string; sha256: string };
  collected: Collected;
  analysis: Analysis;
  problems: ImportProblem[];
}

/** How a commit ended, and whether its readings were judged again (null: it had none to write). */
export interface CommitOutcome {
  status: 'committed' | 'blocked';
  judgedAgain: boolean | null;
}

/**
 * The commit itself, in ONE transaction taken with the write lock at its start (`immediate`, so it
 * waits for a short write of the main thread instead of failing on a stale snapshot): every accepted
 * reading goes through the measurements module's bulk path, which judges them again on exactly the state
 * it writes to (someone may have weighed a coupon since the preview) unless the records' change counter
 * shows nothing changed since the preview judged them; then the corrections, the problems and the import
 * row. Under all-or-nothing, a reading refused now rolls everything back and the import goes back to
 * `previewed`, saying why. Runs in a worker thread (commit-worker.ts) on its own connection.
 */
export function writeCommit(db: Db, measurements: Measurements, job: CommitJob, now: () => Date): CommitOutcome {
  const { importId: id, actor, mapping, collected, analysis: a, problems } = job;
  const source = `import:${id}` as const;
  let blocked = false;
  let judgedAgain: boolean | null = null;
  try {
    db.transaction(
      (tx) => {
        if (a.accepted.length) {
          const accepted = a.accepted;
          a.accepted = [];
          const out = measurements.bulkAdd(
            tx,
            actor,
            source,
            accepted.map((i) => entryOf(mapping, collected, i)),
            // Read first in this transaction: the corrections below add audit entries.
            { skipRefused: true, audit: 'per-source', judgedAt: a.judgedAt },
          );
          judgedAgain = out.judgedAgain;
          // Refused now though accepted a moment ago: the coupon changed meanwhile.
          const lateAt = new Map<number, ReadingProblem>();
          const before = a.problems.length;
          for (const p of out.refused) if (!lateAt.has(p.entry)) lateAt.set(p.entry, p);
          accepted.forEach((i, j) => {
            const p = lateAt.get(j);
            if (p) refusal(a, mapping, collected, i, p);
            else a.accepted.push(i);
          });
          if (a.problems.length > before) {
            problems.push(...a.problems.slice(before));
            problems.sort((x, y) => x.row - y.row);
          }
          a.counts.accepted = a.accepted.length;
          if (job.choice === 'all-or-nothing' && a.counts.problems > 0) {
            blocked = true;
            throw new Conflict(blockedMessage(a.counts.problems));
          }
        }
        const corrections: { oldId: number; newId: number }[] = [];
        for (const i of a.corrections) {
          const current = currentWeighingAt(tx, (collected.coupon[i] as CouponKey).id, mapping.stage);
          if (!current) continue;
          const reason = `${mapping.correctionReason ?? 'Corrected by an import'} (import ${id}, row ${collected.row[i]})`;
          const out = measurements.correctWeighing(tx, actor, current.id, {
            massG: collected.massG[i] as number,
            measuredAt: collected.measuredAt[i] as string,
            reason,
          });
          corrections.push({ oldId: current.id, newId: out.row.id });
        }
        a.previewRows = previewRowsOf(mapping, collected, a);
        replaceProblems(tx, id, problems);
        updateImport(tx, id, {
          status: 'committed',
          counts: a.counts,
          previewRows: a.previewRows,
          corrections,
          committedAt: now().toISOString(),
          committedBy: actor.id,
          error: null,
        });
        writeAudit(tx, {
          actorId: actor.id,
          action: 'commit',
          entity: 'import',
          entityId: id,
          after: {
            stage: mapping.stage,
            counts: a.counts,
            choice: job.choice,
            file: job.file.originalName,
            sha256: job.file.sha256,
            corrections: corrections.length,
          },
        });
      },
      { behavior: 'immediate' },
    );
    return { status: 'committed', judgedAgain };
  } catch (err) {
    if (!blocked || !(err instanceof AppError)) throw err;
    db.transaction((tx) => {
      replaceProblems(tx, id, problems);
      updateImport(tx, id, { status: 'previewed', counts: a.counts, previewRows: a.previewRows, error: blockedMessage(a.counts.problems) });
    });
    return { status: 'blocked', judgedAgain };
  }
}

/**
 * The job as posted to the worker: the per-reading columns as typed arrays and JSON text rather than
 * 100,000 objects and 200,000 strings, because posting copies the data on the main thread (a structured
 * clone of the plain job held it ~0.1 s; this one takes a few ms plus two JSON.stringify calls).
 */
export interface PackedCommitJob extends Omit<CommitJob, 'collected' | 'analysis'> {
  collected: Omit<Collected, 'row' | 'coupon' | 'massG' | 'measuredAt' | 'replacedBy'> & {
    row: Int32Array;
    couponId: Float64Array;
    role: Uint8Array;
    tags: string;
    massG: Float64Array;
    measuredAt: string;
  };
  analysis: Omit<Analysis, 'accepted' | 'corrections'> & { accepted: Int32Array; corrections: Int32Array };
}

export function packJob(job: CommitJob): PackedCommitJob {
  const c = job.collected;
  const n = c.row.length;
  const couponId = new Float64Array(n);
  const role = new Uint8Array(n);
  const tags = new Array<string>(n);
  for (let i = 0; i < n; i++) {
    const k = c.coupon[i] as CouponKey;
    couponId[i] = k.id;
    role[i] = k.role === 'control' ? 1 : 0;
    tags[i] = k.tag;
  }
  return {
    ...job,
    collected: {
      dataRows: c.dataRows,
      massColumn: c.massColumn,
      problems: c.problems,
      skippedRows: c.skippedRows,
      problemRows: c.problemRows,
      row: Int32Array.from(c.row),
      couponId,
      role,
      tags: JSON.stringify(tags),
      massG: Float64Array.from(c.massG),
      measuredAt: JSON.stringify(c.measuredAt),
    },
    analysis: { ...job.analysis, accepted: Int32Array.from(job.analysis.accepted), corrections: Int32Array.from(job.analysis.corrections) },
  };
}

export function unpackJob(p: PackedCommitJob): CommitJob {
  const c = p.collected;
  const tags = JSON.parse(c.tags) as string[];
  const coupon: CouponKey[] = Array.from(c.couponId, (id, i) => ({ id, tag: tags[i] as string, role: c.role[i] === 1 ? 'control' : 'treated' }));
  return {
    ...p,
    collected: {
      dataRows: c.dataRows,
      massColumn: c.massColumn,
      problems: c.problems,
      skippedRows: c.skippedRows,
      problemRows: c.problemRows,
      row: Array.from(c.row),
      coupon,
      massG: Array.from(c.massG),
      measuredAt: JSON.parse(c.measuredAt) as string[],
      replacedBy: [],
    },
    analysis: { ...p.analysis, accepted: Array.from(p.analysis.accepted), corrections: Array.from(p.analysis.corrections) },
  };
}
