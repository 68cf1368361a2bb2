import { readMassUnit, type ImportMassUnit } from './mass-units';

/** Which character separates the decimals in a file: a point, or a comma as in much of Europe. */
export const DECIMAL_MARKS = ['.', ','] as const;
export type DecimalMark = (typeof DECIMAL_MARKS)[number];

/** Why a reading could not be read. */
export const READING_FAILURES = ['empty', 'not-a-number', 'unknown-unit', 'overload'] as const;
export type ReadingFailure = (typeof READING_FAILURES)[number];

export type Reading =
  { ok: true; value: number; unit: ImportMassUnit | null; stable: boolean | null } | { ok: false; reason: ReadingFailure; message: string; unitText?: string };

/**
 * Stability markers as balances print them, upper-cased. A balance that marks a reading as still
 * settling prints one of the unstable ones; a bare "S" or "ST" says the reading had settled.
 * (Common practice across balance interfaces; no single published list.)
 */
const STABLE_FLAGS = new Set(['ST', 'S', 'STABLE', 'STA', 'OK', 'YES', 'Y', 'TRUE']);
const UNSTABLE_FLAGS = new Set(['US', 'U', 'D', 'DYN', 'UNSTABLE', 'UNST', '?', '*', '~', 'NO', 'N', 'FALSE']);
const OVERLOAD = /^(?:[-+]?\s*-?OL-?|OVER(?:LOAD)?|UNDER(?:LOAD)?|ERR\w*|E\d+)$/i;

/** A stability flag on its own (a column of its own or a token): true stable, false unstable, null if not a flag. */
export function readStabilityFlag(text: string): boolean | null {
  const t = text.trim().toUpperCase();
  if (STABLE_FLAGS.has(t)) return true;
  if (UNSTABLE_FLAGS.has(t)) return false;
  return null;
}

const LEADING_FLAG = /^(ST|US|STABLE|UNSTABLE|DYN|S|U|D|\?|\*|~)(?:\s*[,:;]\s*|\s+)/i;
// Only unambiguous words trail; a trailing lone "S" or "D" could be part of a unit-less note.
const TRAILING_FLAG = /(?:\s*[,;]\s*|\s+)(ST|US|STABLE|UNSTABLE|DYN|\?|\*|~)$|(\?|\*|~)$/i;
const BODY = /^([+-])?\s*([0-9][0-9.,' ]*[0-9]|[0-9]|[.,][0-9]+)\s*([a-zA-Z]{1,8}\.?)?$/;

/**
 * Parses a number as written with the given decimal mark. Thousands separators (the other mark, a
 * space or an apostrophe) are accepted only in proper groups of three, so "12,34" with a decimal point
 * is refused rather than read as 1234.
 */
export function parseDecimal(text: string, decimal: DecimalMark): number | null {
  const s = text.trim();
  const re = decimal === ',' ? COMMA_NUMBER : POINT_NUMBER;
  let digits: string;
  if (re.plain.test(s)) digits = s;
  else if (re.grouped.test(s)) digits = s.replace(re.separators, '');
  else return null;
  const n = Number(decimal === ',' ? digits.replace(',', '.') : digits);
  return Number.isFinite(n) ? n : null;
}

// Built once: building them on each call cost a 100,000-row preview ~0.15 s.
const numberPatterns = (d: string, t: string) => ({
  plain: new RegExp(`^(?:\\d+(?:${d}\\d*)?|${d}\\d+)$`),
  grouped: new RegExp(`^\\d{1,3}(?:${t}\\d{3})+(?:${d}\\d*)?$`),
  separators: new RegExp(t, 'g'),
});
const POINT_NUMBER = numberPatterns('\\.', "[, ']");
const COMMA_NUMBER = numberPatterns(',', "[. ']");

/**
 * The shapes nearly every row of a scale's file has: an optional sign and spaces, digits with at most one
 * decimal mark (digits on both sides), then optionally spaces and a unit Lumenbook knows ("12.345",
 * "-0.5", "+   12.345 g", "0,452oz") — no flag, grouping or other padding. Read straight from the
 * characters, with exactly the answer the general path gives (reading.test.ts compares both on many
 * inputs); anything else gets null, and the general path.
 */
function plainReading(s: string, decimal: DecimalMark): Reading | null {
  const n = s.length;
  let i = 0;
  const first = s.charCodeAt(0);
  if (first === 43 || first === 45) {
    i = 1; // + -
    while (s.charCodeAt(i) === 32) i++;
  }
  const start = i;
  const mark = decimal === ',' ? 44 : 46;
  let at = -1;
  for (; i < n; i++) {
    const c = s.charCodeAt(i);
    if (c >= 48 && c <= 57) continue;
    if (c !== mark || at >= 0) break;
    at = i;
  }
  const end = i;
  // At least one digit, and a digit on both sides of the mark.
  if (end === start || at === start || at === end - 1) return null;
  let unit: ImportMassUnit | null = null;
  if (end < n) {
    while (s.charCodeAt(i) === 32) i++;
    const from = i;
    for (; i < n; i++) {
      const c = s.charCodeAt(i) | 32; // lower case
      if (c < 97 || c > 122) return null;
    }
    if (from === n) return null; // trailing spaces
    unit = readMassUnit(s.slice(from));
    if (!unit) return null;
  }
  const digits = s.slice(start, end);
  const value = Number(at >= 0 && decimal === ',' ? digits.replace(',', '.') : digits);
  if (!Number.isFinite(value)) return null;
  return { ok: true, value: first === 45 ? -value : value, unit, stable: null };
}

/**
 * Reads one balance reading such as `+   12.345 g`, `0.4520 oz`, `12,345 g` (decimal comma),
 * `ST,+0012.345 g`, `S S      12.345 g` or `12.345 g ?`: an optional leading or trailing stability
 * flag, a sign, padding, the number and an optional unit. Pure, so a serial-port reader can use it too.
 * The value keeps its sign; deciding that a negative mass is impossible is the caller's business.
 */
export function parseReading(text: string, decimal: DecimalMark = '.'): Reading {
  return plainReading(text, decimal) ?? parseReadingGeneral(text, decimal);
}

/** parseReading without its fast path (exported for the tests that compare the two). */
export function parseReadingGeneral(text: string, decimal: DecimalMark = '.'): Reading {
  let s = text.replace(/\u00a0/g, ' ').trim();
  if (s === '') return { ok: false, reason: 'empty', message: 'The reading is empty' };
  let stable: boolean | null = null;
  // Two-letter command echoes some balances send: "S S" stable, "S D" still moving.
  const echo = /^S\s+([SD])\s+/i.exec(s);
  if (echo) {
    stable = echo[1]?.toUpperCase() === 'S';
    s = s.slice(echo[0].length);
  } else {
    const lead = LEADING_FLAG.exec(s);
    if (lead && /[0-9+-]/.test(s.slice(lead[0].length, lead[0].length + 1))) {
      stable = readStabilityFlag(lead[1] as string);
      s = s.slice(lead[0].length);
    }
  }
  const trail = TRAILING_FLAG.exec(s);
  if (trail) {
    const flag = readStabilityFlag((trail[1] ?? trail[2]) as string);
    if (flag !== null) stable = stable === null ? flag : stable && flag;
    s = s.slice(0, trail.index).trim();
  }
  if (OVERLOAD.test(s))
    return { ok: false, reason: 'overload', message: `The balance reported "${s}" (over or under its range, or an error) instead of a mass` };
  const m = BODY.exec(s);
  if (!m) return { ok: false, reason: 'not-a-number', message: `"${clip(text)}" is not a number` };
  const value = parseDecimal((m[2] as string).replace(/\s+/g, ' '), decimal);
  if (value === null) {
    const hint = decimal === '.' && /\d,\d/.test(m[2] as string) ? ' with a decimal point (is the file written with decimal commas?)' : '';
    return { ok: false, reason: 'not-a-number', message: `"${clip(text)}" is not a number${hint}` };
  }
  let unit: ImportMassUnit | null = null;
  if (m[3]) {
    unit = readMassUnit(m[3]);
    if (!unit) return { ok: false, reason: 'unknown-unit', unitText: m[3], message: `"${m[3]}" is not a mass unit Lumenbook knows (g, kg, oz, lb, ct, dwt)` };
  }
  return { ok: true, value: m[1] === '-' ? -value : value, unit, stable };
}

function clip(s: string): string {
  const t = s.trim();
  return t.length > 40 ? `${t.slice(0, 40)}…` : t;
}
