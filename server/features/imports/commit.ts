import type Database from 'better-sqlite3';
import type { Db } from '../../db/client';
import { writeAudit } from '../../db/audit';
import { writeInSteps } from '../../db/write-in-steps';
import type { MeasurementEntry, Measurements, ReadingProblem } from '../../measurements/measurements';
import type { Steps } from '../../measurements/steps';
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
 * MB): candidate i is file row `row[i]` for `coupon[i]`. Rows the rules still have to judge. Plain data.
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

/** Everything the commit's transaction works from. */
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

/** Readings written per step of the commit, between which the event loop gets a turn (~10–30 ms each). */
const COMMIT_SLICE = 2_000;

/** Thrown inside the transaction when all-or-nothing was chosen and a reading is refused now. */
class Blocked extends Error {
  constructor(readonly judgedAgain: boolean | null) {
    super('Blocked');
  }
}

/**
 * The commit's transaction, step by step: every accepted reading goes through the measurements module's
 * bulk path, which judges them again on exactly the state it writes to (someone may have weighed a
 * coupon since the preview) unless the records' change counter shows nothing changed since the preview
 * judged them; then the corrections, the problems and the import row. Under all-or-nothing, a reading
 * refused now throws Blocked. Yields the share done.
 */
function* commitSteps(db: Db, measurements: Measurements, job: CommitJob, now: () => Date): Steps<boolean | null> {
  const { importId: id, actor, mapping, collected, analysis: a, problems } = job;
  const source = `import:${id}` as const;
  let judgedAgain: boolean | null = null;
  if (a.accepted.length) {
    const accepted = a.accepted;
    a.accepted = [];
    const out = yield* measurements.bulkAddInSteps(
      db,
      actor,
      source,
      accepted.map((i) => entryOf(mapping, collected, i)),
      // Read first in this transaction: the corrections below add audit entries.
      { skipRefused: true, audit: 'per-source', judgedAt: a.judgedAt, slice: COMMIT_SLICE },
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
    if (job.choice === 'all-or-nothing' && a.counts.problems > 0) throw new Blocked(judgedAgain);
  }
  const corrections: { oldId: number; newId: number }[] = [];
  for (const i of a.corrections) {
    const current = currentWeighingAt(db, (collected.coupon[i] as CouponKey).id, mapping.stage);
    if (!current) continue;
    const reason = `${mapping.correctionReason ?? 'Corrected by an import'} (import ${id}, row ${collected.row[i]})`;
    const out = measurements.correctWeighing(db, actor, current.id, {
      massG: collected.massG[i] as number,
      measuredAt: collected.measuredAt[i] as string,
      reason,
    });
    corrections.push({ oldId: current.id, newId: out.row.id });
    if (corrections.length % COMMIT_SLICE === 0) yield 1;
  }
  a.previewRows = previewRowsOf(mapping, collected, a);
  replaceProblems(db, id, problems);
  updateImport(db, id, {
    status: 'committed',
    counts: a.counts,
    previewRows: a.previewRows,
    corrections,
    committedAt: now().toISOString(),
    committedBy: actor.id,
    error: null,
  });
  writeAudit(db, {
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
  return judgedAgain;
}

/**
 * Writes the commit through `writeInSteps` (decision 0017): one transaction on a second connection, a
 * slice at a time with the event loop free between slices; on any error it is rolled back, all accepted
 * rows or none. Under all-or-nothing with a reading refused now, nothing is written and the import goes
 * back to `previewed`, saying why.
 */
export function writeCommit(
  app: Database.Database,
  measurements: Measurements,
  job: CommitJob,
  now: () => Date,
  onProgress: (f: number) => void = () => {},
): Promise<CommitOutcome> {
  return writeInSteps<CommitOutcome>(
    app,
    function* (db) {
      return { status: 'committed', judgedAgain: yield* commitSteps(db, measurements, job, now) };
    },
    onProgress,
    (db, err) => {
      if (!(err instanceof Blocked)) return null;
      const { importId: id, analysis: a, problems } = job;
      db.transaction((tx) => {
        replaceProblems(tx, id, problems);
        updateImport(tx, id, { status: 'previewed', counts: a.counts, previewRows: a.previewRows, error: blockedMessage(a.counts.problems) });
      });
      return { value: { status: 'blocked', judgedAgain: err.judgedAgain } };
    },
  );
}
