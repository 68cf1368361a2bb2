import type { Db } from '../../db/client';
import { Unprocessable } from '../../http/errors';
import type { ImportProblemCode, ImportRowOutcome } from '../../../shared/constants/imports';
import type { ImportMapping, ImportProblem } from '../../../shared/schemas/imports';
import { nearestTags } from '../../../shared/imports/levenshtein';
import { readRow, type RowProblem } from '../../../shared/imports/rows';
import { streamRows } from './file-reader';
import { couponKeysAfter, couponKeysByIds, findRun, type CouponKey, type ImportRow } from './imports.repo';
import { MAX_PROBLEMS, type Collected } from './commit';

/** Unknown tags for which near matches are searched (each search walks every tag). */
const MAX_SUGGESTION_SEARCHES = 500;
/** Coupon tags read per step when matching a file's tags. */
const KEYS_PAGE = 10_000;

const yieldToLoop = () => new Promise<void>((resolve) => setImmediate(resolve));

export const clipCells = (cells: string[]) => cells.slice(0, 30).map((c) => (c.length > 200 ? `${c.slice(0, 200)}…` : c));

/**
 * Reads every row of the file through the mapping (streaming) and collects, column by column, what
 * the measurements module will be asked to write; rows the file itself explains (bad mass, unknown
 * tag, unsettled reading, a coupon weighed again later…) are counted and the first MAX_PROBLEMS kept.
 * The coupon-dependent rules are applied afterwards, by the module.
 */
export async function collectReadings(
  db: Db,
  file: string,
  r: Pick<ImportRow, 'createdAt'>,
  mapping: ImportMapping,
  onProgress: (f: number) => void,
): Promise<Collected> {
  const byTag = new Map<string, CouponKey>();
  // Tags in any case, built at the first tag that does not match exactly (most files match exactly).
  let byUpper: Map<string, CouponKey | null> | null = null;
  const upper = () => {
    if (!byUpper) {
      byUpper = new Map();
      for (const k of byTag.values()) {
        const u = k.tag.toUpperCase();
        byUpper.set(u, byUpper.has(u) ? null : k);
      }
    }
    return byUpper;
  };
  let sequence: CouponKey[] = [];
  if (mapping.target.mode === 'tag') {
    // Page by page with a turn of the event loop between: 100,000 tags at once held it ~0.3 s.
    for (let after = 0; ;) {
      const page = couponKeysAfter(db, after, KEYS_PAGE);
      for (const k of page) {
        byTag.set(k.tag, k);
      }
      if (page.length < KEYS_PAGE) break;
      after = (page[page.length - 1] as CouponKey).id;
      await yieldToLoop();
    }
  } else {
    const run = findRun(db, mapping.target.runId);
    if (!run) throw new Unprocessable(`No run with id ${mapping.target.runId}`, { 'mapping.target.runId': ['No such run'] });
    const keys = new Map(couponKeysByIds(db, mapping.target.couponIds).map((k) => [k.id, k]));
    const missing = mapping.target.couponIds.filter((id) => !keys.has(id));
    if (missing.length) throw new Unprocessable(`No coupon with id ${missing[0]}`, { 'mapping.target.couponIds': [`No coupon with id ${missing.join(', ')}`] });
    sequence = mapping.target.couponIds.map((id) => keys.get(id) as CouponKey);
  }
  const ctx = { columnNames: [] as string[], fallbackIso: r.createdAt };
  const c: Collected = {
    dataRows: 0,
    massColumn: '',
    problems: [],
    skippedRows: 0,
    problemRows: 0,
    row: [],
    coupon: [],
    massG: [],
    measuredAt: [],
    replacedBy: [],
  };
  const lastOf = new Map<number, number>();
  const suggestionCache = new Map<string, string[]>();
  let next = 0;
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
  ) => {
    if (c.problems.length < MAX_PROBLEMS) c.problems.push({ row, column, code, outcome, message, suggestions, cells: clipCells(cells) });
  };
  const countRow = (outcome: ImportRowOutcome) => (outcome === 'skipped' ? c.skippedRows++ : c.problemRows++);

  await streamRows(
    file,
    mapping.format,
    (cells, row) => {
      if (!seenHeader) {
        seenHeader = true;
        ctx.columnNames = cells.map((cl, i) => cl.trim() || `Column ${i + 1}`);
        return;
      }
      c.dataRows++;
      const read = readRow(cells, mapping, ctx);
      const rowProblems: (RowProblem & { suggestions?: string[] })[] = read.problems;
      let coupon: CouponKey | null | undefined;
      if (mapping.target.mode === 'tag' && read.tag) {
        coupon = byTag.get(read.tag) ?? upper().get(read.tag.toUpperCase());
        if (!coupon) {
          let sg = suggestionCache.get(read.tag);
          if (!sg) {
            sg = suggestionCache.size < MAX_SUGGESTION_SEARCHES ? nearestTags(read.tag, byTag.keys()) : [];
            suggestionCache.set(read.tag, sg);
          }
          const text = read.tag.length > 40 ? `${read.tag.slice(0, 40)}…` : read.tag;
          const message = `No coupon is tagged "${text}"${sg.length ? `; did you mean ${sg.join(', ')}?` : ''}`;
          rowProblems.unshift({ code: 'unknown-tag', column: columnName(mapping.target.tagColumn), message, suggestions: sg });
        }
      }
      if (rowProblems.length) {
        // An unsettled reading is left out, not wrong: the balance usually prints the settled one next.
        const outcome = rowProblems.every((p) => p.code === 'unstable') ? 'skipped' : 'problem';
        countRow(outcome);
        for (const p of rowProblems) add(row, cells, p.code, p.column, p.message, outcome, p.suggestions);
        return;
      }
      if (mapping.target.mode === 'sequence') {
        coupon = sequence[next++];
        if (!coupon) {
          countRow('problem');
          add(row, cells, 'sequence-extra-reading', null, `Reading ${next} of the file has no coupon: the weighing order lists ${sequence.length}`, 'problem');
          return;
        }
      }
      const k = coupon as CouponKey;
      if (mapping.stage !== 'drying-check') {
        const prev = lastOf.get(k.id);
        if (prev !== undefined) c.replacedBy[prev] = row;
        lastOf.set(k.id, c.row.length);
      }
      c.row.push(row);
      c.coupon.push(k);
      c.massG.push(read.massG as number);
      c.measuredAt.push(read.measuredAt as string);
      c.replacedBy.push(0);
    },
    (f) => onProgress(f * 0.8),
  );
  c.massColumn = columnName(mapping.massColumn);
  if (mapping.target.mode === 'sequence' && next < sequence.length) {
    const left = sequence.slice(next).map((k) => k.tag);
    const msg = `${left.length} coupon${left.length === 1 ? '' : 's'} of the weighing order got no reading: ${left.slice(0, 10).join(', ')}${left.length > 10 ? ', …' : ''}`;
    countRow('problem');
    add(0, [], 'sequence-missing-reading', null, msg, 'problem');
  }
  return c;
}

/** Sorts problems by row and fills in the cells of those found after the file was read (a second, streamed pass). */
export async function finishProblems(file: string, mapping: ImportMapping, problems: ImportProblem[]): Promise<ImportProblem[]> {
  const need = new Map<number, ImportProblem[]>();
  for (const p of problems) {
    if (p.row > 0 && p.cells.length === 0) {
      const list = need.get(p.row);
      if (list) list.push(p);
      else need.set(p.row, [p]);
    }
  }
  if (need.size) {
    await streamRows(file, mapping.format, (cells, row) => {
      const list = need.get(row);
      if (list) for (const p of list) p.cells = clipCells(cells);
    });
  }
  return problems.sort((a, b) => a.row - b.row).slice(0, MAX_PROBLEMS);
}
