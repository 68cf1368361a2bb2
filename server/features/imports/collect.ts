import type { Db } from '../../db/client';
import { Unprocessable } from '../../http/errors';
import type { ImportProblemCode, ImportRowOutcome } from '../../../shared/constants/imports';
import type { ImportMapping, ImportProblem } from '../../../shared/schemas/imports';
import { tagSearch } from '../../../shared/imports/levenshtein';
import { readRow, type RowProblem } from '../../../shared/imports/rows';
import { streamRows } from './file-reader';
import { couponKeysAfter, couponKeysByIds, findRun, type CouponKey, type ImportRow } from './imports.repo';
import { MAX_PROBLEMS, type Collected } from './commit';

/** Unknown tags for which near matches are searched (each search walks every tag). */
const MAX_SUGGESTION_SEARCHES = 500;
/** Coupon tags read per step when matching a file's tags. */
const KEYS_PAGE = 10_000;

const yieldToLoop = () => new Promise<void>((resolve) => setImmediate(resolve));

/**
 * A copy of a piece of the file's text that keeps nothing else alive: V8 cuts cells out of a parsed chunk as
 * slices holding on to the whole chunk, and the problems are kept with the preview for its commit (up to
 * MAX_PROBLEMS of them, spread over a big file, kept all of its text).
 */
export const detach = (s: string) => JSON.parse(JSON.stringify(s)) as string;

export const clipCells = (cells: string[]) => cells.slice(0, 30).map((c) => detach(c.length > 200 ? `${c.slice(0, 200)}…` : c));

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
  // Tag mode: every coupon's key, in id order. A file usually lists its coupons in the order they were
  // entered (a round of weighings goes down the list), so the coupon after the last one matched is tried
  // first, and the map of all tags is built only at the first row that breaks that order: for a file in
  // order, 100,000 map insertions and lookups (~0.1 s, most of it cache misses) are saved.
  let keys: CouponKey[] = [];
  let byTag: Map<string, number> | null = null;
  // Tags in any case (-1: more than one coupon), built at the first tag that does not match exactly.
  let byUpper: Map<string, number> | null = null;
  let expected = 0;
  /** The index in `keys` of the coupon with this tag (exactly, else in any case when only one), or -1. */
  const find = (tag: string): number => {
    const guess = keys[expected];
    if (guess !== undefined && guess.tag === tag) return expected;
    if (!byTag) {
      byTag = new Map();
      for (let i = 0; i < keys.length; i++) byTag.set((keys[i] as CouponKey).tag, i);
    }
    const exact = byTag.get(tag);
    if (exact !== undefined) return exact;
    if (!byUpper) {
      byUpper = new Map();
      for (let i = 0; i < keys.length; i++) {
        const u = (keys[i] as CouponKey).tag.toUpperCase();
        byUpper.set(u, byUpper.has(u) ? -1 : i);
      }
    }
    return byUpper.get(tag.toUpperCase()) ?? -1;
  };
  // Sequence mode: the weighing order, each entry with the index of its coupon among the distinct ones.
  let sequence: CouponKey[] = [];
  let sequenceIndex: number[] = [];
  let coupons = 0;
  if (mapping.target.mode === 'tag') {
    // Page by page with a turn of the event loop between: 100,000 tags at once held it ~0.3 s.
    for (let after = 0; ;) {
      const page = couponKeysAfter(db, after, KEYS_PAGE);
      for (const k of page) keys.push(k);
      if (page.length < KEYS_PAGE) break;
      after = (page[page.length - 1] as CouponKey).id;
      await yieldToLoop();
    }
    coupons = keys.length;
  } else {
    const run = findRun(db, mapping.target.runId);
    if (!run) throw new Unprocessable(`No run with id ${mapping.target.runId}`, { 'mapping.target.runId': ['No such run'] });
    const byId = new Map(couponKeysByIds(db, mapping.target.couponIds).map((k) => [k.id, k]));
    const missing = mapping.target.couponIds.filter((id) => !byId.has(id));
    if (missing.length) throw new Unprocessable(`No coupon with id ${missing[0]}`, { 'mapping.target.couponIds': [`No coupon with id ${missing.join(', ')}`] });
    sequence = mapping.target.couponIds.map((id) => byId.get(id) as CouponKey);
    const indexOf = new Map<number, number>();
    sequenceIndex = sequence.map((k) => {
      let i = indexOf.get(k.id);
      if (i === undefined) indexOf.set(k.id, (i = indexOf.size));
      return i;
    });
    coupons = indexOf.size;
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
  // Per coupon (by its index above): the last candidate read for it, -1 for none yet.
  const lastOf = new Int32Array(coupons).fill(-1);
  // Unknown tags: the first MAX_SUGGESTION_SEARCHES distinct ones, each with its stored problems, which get the
  // nearest known tags once the file is read, searched with turns of the event loop between (one search over
  // 100,000 tags takes 10–50 ms, and a file mapped on the wrong column has thousands of unknown tags).
  const unknownTags = new Map<string, ImportProblem[]>();
  const unknownMessage = (tag: string, sg: string[]) => {
    const text = tag.length > 40 ? `${tag.slice(0, 40)}…` : tag;
    return `No coupon is tagged "${text}"${sg.length ? `; did you mean ${sg.join(', ')}?` : ''}`;
  };
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
    if (c.problems.length >= MAX_PROBLEMS) return null;
    const p: ImportProblem = { row, column, code, outcome, message: detach(message), suggestions, cells: clipCells(cells) };
    c.problems.push(p);
    return p;
  };
  const countRow = (outcome: ImportRowOutcome) => (outcome === 'skipped' ? c.skippedRows++ : c.problemRows++);

  await streamRows(
    file,
    mapping.format,
    (cells, row) => {
      if (!seenHeader) {
        seenHeader = true;
        ctx.columnNames = cells.map((cl, i) => detach(cl.trim()) || `Column ${i + 1}`);
        return;
      }
      c.dataRows++;
      const read = readRow(cells, mapping, ctx);
      const rowProblems: (RowProblem & { suggestions?: string[] })[] = read.problems;
      let at = -1;
      let waiting: ImportProblem[] | undefined;
      if (mapping.target.mode === 'tag' && read.tag) {
        at = find(read.tag);
        if (at < 0) {
          waiting = unknownTags.get(read.tag);
          if (!waiting && unknownTags.size < MAX_SUGGESTION_SEARCHES) unknownTags.set(read.tag, (waiting = []));
          const message = unknownMessage(read.tag, []);
          rowProblems.unshift({ code: 'unknown-tag', column: columnName(mapping.target.tagColumn), message, suggestions: [] });
        } else expected = at + 1;
      }
      if (rowProblems.length) {
        // An unsettled reading is left out, not wrong: the balance usually prints the settled one next.
        const outcome = rowProblems.every((p) => p.code === 'unstable') ? 'skipped' : 'problem';
        countRow(outcome);
        for (const p of rowProblems) {
          const stored = add(row, cells, p.code, p.column, p.message, outcome, p.suggestions);
          if (stored && waiting && p.code === 'unknown-tag') waiting.push(stored);
        }
        return;
      }
      let k: CouponKey;
      if (mapping.target.mode === 'sequence') {
        if (next >= sequence.length) {
          next++;
          countRow('problem');
          add(row, cells, 'sequence-extra-reading', null, `Reading ${next} of the file has no coupon: the weighing order lists ${sequence.length}`, 'problem');
          return;
        }
        k = sequence[next] as CouponKey;
        at = sequenceIndex[next++] as number;
      } else k = keys[at] as CouponKey;
      if (mapping.stage !== 'drying-check') {
        const prev = lastOf[at] as number;
        if (prev >= 0) c.replacedBy[prev] = row;
        lastOf[at] = c.row.length;
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
  // Only tags with a stored problem are searched: the others' suggestions would be shown nowhere.
  const searched = [...unknownTags].filter(([, problems]) => problems.length > 0);
  if (searched.length) {
    const nearest = tagSearch(keys.map((k) => k.tag));
    let since = performance.now();
    for (const [tag, problems] of searched) {
      const sg = nearest(tag);
      const message = detach(unknownMessage(tag, sg));
      for (const p of problems) {
        p.message = message;
        p.suggestions = sg;
      }
      if (performance.now() - since > 10) {
        await yieldToLoop();
        since = performance.now();
      }
    }
  }
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
