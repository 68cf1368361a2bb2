import Papa from 'papaparse';
import { isDateLike, isTimeLike, splitDateTime } from './dates';
import { readMassUnit } from './mass-units';
import { parseDecimal, parseReading, readStabilityFlag, type DecimalMark } from './reading';

/** Field separators Lumenbook recognises; `spaces` is any run of spaces (fixed-width printouts). */
export const IMPORT_DELIMITERS = [',', ';', '\t', '|', 'spaces'] as const;
export type ImportDelimiter = (typeof IMPORT_DELIMITERS)[number];
export const DELIMITER_LABELS: Record<ImportDelimiter, string> = {
  ',': 'comma',
  ';': 'semicolon',
  '\t': 'tab',
  '|': 'vertical bar',
  spaces: 'runs of spaces',
};

export const LINE_ENDINGS = ['crlf', 'lf', 'cr'] as const;
export type LineEnding = (typeof LINE_ENDINGS)[number];

/** The longest line Lumenbook reads. A balance's line is a few dozen characters; anything this long is not a log of readings. */
export const MAX_LINE_CHARS = 64 * 1024;

export function detectLineEnding(text: string): LineEnding {
  const i = text.search(/[\r\n]/);
  if (i < 0) return 'lf';
  return text[i] === '\n' ? 'lf' : text[i + 1] === '\n' ? 'crlf' : 'cr';
}

const SIGN_ONLY = /^[+-]$/;

/**
 * With `spaces` as the separator a reading such as `+   12.345 g` falls apart into `+`, `12.345`, `g`;
 * this joins a lone sign to the number after it and a unit to the number before it, and drops the
 * empty fields a run of spaces leaves.
 */
export function joinSpaceTokens(fields: string[]): string[] {
  const t = fields.filter((f) => f.trim() !== '');
  const out: string[] = [];
  for (let i = 0; i < t.length; i++) {
    const f = t[i] as string;
    const next = t[i + 1];
    if (SIGN_ONLY.test(f) && next !== undefined && /^[0-9.,]/.test(next)) {
      out.push(`${f}${next}`);
      i++;
      continue;
    }
    const prev = out[out.length - 1];
    if (prev !== undefined && readMassUnit(f) && /[0-9]$/.test(prev)) {
      out[out.length - 1] = `${prev} ${f}`;
      continue;
    }
    out.push(f);
  }
  return out;
}

/** Splits a piece of text into rows of fields with the given separator (quotes honoured). */
export function splitRows(text: string, delimiter: ImportDelimiter): string[][] {
  const parsed = Papa.parse<string[]>(text, { delimiter: delimiter === 'spaces' ? ' ' : delimiter, skipEmptyLines: 'greedy' });
  return delimiter === 'spaces' ? parsed.data.map(joinSpaceTokens) : parsed.data;
}

function mode(ns: number[]): { value: number; share: number } {
  const counts = new Map<number, number>();
  for (const n of ns) counts.set(n, (counts.get(n) ?? 0) + 1);
  let best = 0;
  let bestN = 0;
  for (const [v, c] of counts) if (c > bestN || (c === bestN && v > best)) [best, bestN] = [v, c];
  return { value: best, share: ns.length ? bestN / ns.length : 0 };
}

export interface DelimiterGuess {
  delimiter: ImportDelimiter;
  columns: number;
  reason: string;
}

/**
 * The separator that splits the sample's lines into the same number of fields most consistently,
 * more than one field preferred; ties go to the order of IMPORT_DELIMITERS. The last line is left out,
 * since a sample usually ends mid-line.
 */
export function detectDelimiter(lines: string[]): DelimiterGuess {
  const sample = lines.filter((l) => l.trim() !== '').slice(0, 200);
  const text = sample.join('\n');
  let best: (DelimiterGuess & { score: number }) | null = null;
  for (const d of IMPORT_DELIMITERS) {
    const rows = splitRows(text, d);
    const m = mode(rows.map((r) => r.length));
    if (m.value < 2) continue;
    // Consistency first; among equally consistent separators, the one giving more columns.
    const score = m.share * 100 + Math.min(m.value, 20) / 10 - (d === 'spaces' ? 1 : 0);
    if (!best || score > best.score) {
      best = {
        delimiter: d,
        columns: m.value,
        score,
        reason: `${DELIMITER_LABELS[d]} splits ${Math.round(m.share * 100)} % of the sampled lines into ${m.value} fields`,
      };
    }
  }
  if (!best) return { delimiter: ',', columns: 1, reason: 'No separator splits the lines into fields: the file has one column' };
  return { delimiter: best.delimiter, columns: best.columns, reason: best.reason };
}

const NUMBER_LIKE = /^[+-]?\s*\d/;

/** Is this cell a value rather than a column name? */
function valueLike(cell: string, decimal: DecimalMark): boolean {
  const c = cell.trim();
  if (c === '') return false;
  if (isDateLike(c) || isTimeLike(c) || splitDateTime(c)) return true;
  if (parseReading(c, decimal).ok) return true;
  return NUMBER_LIKE.test(c);
}

/**
 * A first row of names over rows of values is a header: the first row holds no value-like cell
 * where the rows below have one in most lines.
 */
export function detectHeader(rows: string[][], decimal: DecimalMark): { hasHeader: boolean; reason: string } {
  const [first, ...rest] = rows;
  if (!first) return { hasHeader: false, reason: 'The file is empty' };
  if (rest.length === 0) {
    const names = first.every((c) => c.trim() !== '' && !valueLike(c, decimal));
    return names ? { hasHeader: true, reason: 'The only line holds names, not values' } : { hasHeader: false, reason: 'The only line holds values' };
  }
  const firstValues = first.filter((c) => valueLike(c, decimal)).length;
  const columnsWithValues = first.map((_, i) => rest.filter((r) => valueLike(r[i] ?? '', decimal)).length / rest.length).filter((share) => share >= 0.5).length;
  if (firstValues === 0 && columnsWithValues > 0) return { hasHeader: true, reason: 'The first line holds names where the lines below hold numbers and dates' };
  return {
    hasHeader: false,
    reason: firstValues > 0 ? 'The first line already holds values, so the file has no header' : 'The first line looks like the others',
  };
}

/**
 * Decimal comma or point, from the number-like cells (dates and times left out): a comma between
 * digits in a file with no decimal point between digits means decimal commas.
 */
export function detectDecimal(rows: string[][]): { decimal: DecimalMark; reason: string } {
  let comma = 0;
  let point = 0;
  for (const row of rows) {
    for (const cell of row) {
      const c = cell.trim();
      if (!NUMBER_LIKE.test(c) && !/^[A-Za-z?*~]{1,8}[ ,:;]+[+-]?\s*\d/.test(c)) continue;
      if (isDateLike(c) || isTimeLike(c) || splitDateTime(c)) continue;
      if (/\d,\d/.test(c)) comma++;
      if (/\d\.\d/.test(c)) point++;
    }
  }
  if (comma > 0 && point === 0) return { decimal: ',', reason: `Numbers are written with a decimal comma (${comma} in the sample, no decimal points)` };
  if (point > 0) return { decimal: '.', reason: `Numbers are written with a decimal point (${point} in the sample)` };
  return { decimal: '.', reason: 'No decimals in the sample; a decimal point is assumed' };
}

/** What a column's sampled values look like. */
export const COLUMN_KINDS = ['tag', 'reading', 'number', 'unit', 'date', 'time', 'datetime', 'stability', 'text', 'empty'] as const;
export type ColumnKind = (typeof COLUMN_KINDS)[number];

export interface ColumnGuess {
  index: number;
  name: string;
  kind: ColumnKind;
  /** Share of sampled values that fit the kind. */
  share: number;
  examples: string[];
}

/**
 * Which of these values are coupon tags: asked once per column with all its sampled values (the server
 * answers with one query, where a question per value cost thousands of lookups per upload).
 */
export type KnownTags = (values: readonly string[]) => ReadonlySet<string>;

/**
 * Classifies each column from its name and sampled values. `knownTags` lets a column of coupon tags be
 * told apart from other text.
 */
export function guessColumns(header: string[] | null, rows: string[][], decimal: DecimalMark, knownTags?: KnownTags): ColumnGuess[] {
  const width = Math.max(header?.length ?? 0, ...rows.map((r) => r.length));
  const out: ColumnGuess[] = [];
  for (let i = 0; i < width; i++) {
    const values = rows.map((r) => (r[i] ?? '').trim()).filter((v) => v !== '');
    const name = header?.[i]?.trim() || `Column ${i + 1}`;
    const share = (test: (v: string) => boolean) => (values.length ? values.filter(test).length / values.length : 0);
    const scores: [ColumnKind, number][] = [
      ['datetime', share((v) => splitDateTime(v) !== null)],
      ['date', share(isDateLike)],
      ['time', share(isTimeLike)],
      ['stability', share((v) => readStabilityFlag(v) !== null)],
      ['unit', share((v) => readMassUnit(v) !== null)],
      ['number', share((v) => parseDecimal(v.replace(/^[+-]\s*/, ''), decimal) !== null)],
      [
        'reading',
        share((v) => {
          const r = parseReading(v, decimal);
          return r.ok && (r.unit !== null || r.stable !== null || /^[+-]|\s{2,}/.test(v));
        }),
      ],
      ['tag', knownTags ? shareOfKnown(values, knownTags) : share((v) => /^[A-Za-z][A-Za-z0-9._/-]*\d[A-Za-z0-9._/-]*$/.test(v) && !readMassUnit(v))],
    ];
    let kind: ColumnKind = values.length ? 'text' : 'empty';
    let best = 0;
    for (const [k, s] of scores) {
      if (s > best + 1e-9 && s >= 0.6) {
        kind = k;
        best = s;
      }
    }
    out.push({ index: i, name, kind, share: best, examples: values.slice(0, 3).map((v) => (v.length > 40 ? `${v.slice(0, 40)}…` : v)) });
  }
  return out;
}

function shareOfKnown(values: string[], knownTags: KnownTags): number {
  if (values.length === 0) return 0;
  const known = knownTags(values);
  return values.filter((v) => known.has(v)).length / values.length;
}

const NAME_HINTS: { role: 'tag' | 'mass' | 'unit' | 'date' | 'time' | 'stability'; pattern: RegExp }[] = [
  { role: 'tag', pattern: /\b(tag|coupon|sample|specimen|id|label|code)\b/i },
  { role: 'mass', pattern: /\b(mass|weight|wt|net|reading|value|gross)\b/i },
  { role: 'unit', pattern: /\b(unit|units|uom)\b/i },
  { role: 'date', pattern: /\b(date|day|timestamp|datetime)\b/i },
  { role: 'time', pattern: /\b(time|clock|hour)\b/i },
  { role: 'stability', pattern: /\b(stab\w*|status|flag|state|steady)\b/i },
];

export interface SuggestedColumns {
  tagColumn: number | null;
  massColumn: number | null;
  unitColumn: number | null;
  dateColumn: number | null;
  timeColumn: number | null;
  stabilityColumn: number | null;
}

/** A first mapping from the column guesses; every choice is shown and can be changed. */
export function suggestColumns(columns: ColumnGuess[]): SuggestedColumns {
  const taken = new Set<number>();
  const pick = (role: (typeof NAME_HINTS)[number]['role'], kinds: ColumnKind[]): number | null => {
    const hint = NAME_HINTS.find((h) => h.role === role)!.pattern;
    const fits = columns.filter((c) => !taken.has(c.index) && kinds.includes(c.kind)).sort((a, b) => kinds.indexOf(a.kind) - kinds.indexOf(b.kind));
    const found = fits.find((c) => hint.test(c.name)) ?? fits[0];
    if (!found) return null;
    taken.add(found.index);
    return found.index;
  };
  const dateColumn = pick('date', ['datetime', 'date']);
  const timeColumn = dateColumn !== null && columns[dateColumn]?.kind === 'datetime' ? null : pick('time', ['time']);
  const stabilityColumn = pick('stability', ['stability']);
  const unitColumn = pick('unit', ['unit']);
  const massColumn = pick('mass', ['reading', 'number']);
  const tagColumn = pick('tag', ['tag', 'text']);
  return { tagColumn, massColumn, unitColumn, dateColumn, timeColumn, stabilityColumn };
}
