/**
 * Dates and times as scales and their PC software write them, read without guessing silently:
 * the order of day and month is inferred from the sample, and the inference says what it assumed and why.
 */

export const DATE_ORDERS = ['ymd', 'dmy', 'mdy'] as const;
export type DateOrder = (typeof DATE_ORDERS)[number];

export interface DateOrderGuess {
  order: DateOrder;
  /** True when the sample could not decide and a rule of thumb chose. */
  assumed: boolean;
  reason: string;
}

export interface WallTime {
  y: number;
  mo: number;
  d: number;
  h: number;
  mi: number;
  s: number;
  ms: number;
}

const ISO_DATE = /^(\d{4})[-/.](\d{1,2})[-/.](\d{1,2})$/;
const NUMERIC_DATE = /^(\d{1,2})([-/.])(\d{1,2})\2(\d{2}|\d{4})$/;
const TIME = /^(\d{1,2}):(\d{2})(?::(\d{2})(?:[.,](\d{1,6}))?)?\s*([AaPp][Mm])?$/;
const DATE_TIME_SPLIT = /^(\S+?)(?:[T ]|,\s*)\s*(\d{1,2}:\d{2}(?::\d{2}(?:[.,]\d{1,6})?)?(?:\s*[AaPp][Mm])?)(?:Z|[+-]\d{2}:?\d{2})?$/;

export function isDateLike(text: string): boolean {
  const t = text.trim();
  return ISO_DATE.test(t) || NUMERIC_DATE.test(t);
}

export function isTimeLike(text: string): boolean {
  return TIME.test(text.trim());
}

/** A date and a time in one cell ("2026-03-01 10:04:05", "01/03/2026 10:04", "2026-03-01T10:04:05"). */
export function splitDateTime(text: string): { date: string; time: string } | null {
  const m = DATE_TIME_SPLIT.exec(text.trim());
  if (!m || !isDateLike(m[1] as string)) return null;
  return { date: m[1] as string, time: m[2] as string };
}

function fullYear(y: string): number {
  const n = Number(y);
  // Two-digit years: a scale's log is recent, so 00–69 → 2000s, 70–99 → 1900s (the POSIX strptime %y rule).
  return y.length === 2 ? (n < 70 ? 2000 + n : 1900 + n) : n;
}

function daysIn(y: number, mo: number): number {
  return new Date(Date.UTC(y, mo, 0)).getUTCDate();
}

/** The last date read: a scale's log repeats one date for many rows, so most rows reuse it. */
let lastDate: { text: string; order: DateOrder; value: { y: number; mo: number; d: number } | null } | null = null;

// Objects below are built field by field, not by spreading: an import reads 100,000 dates, and spread
// copies cost most of the preview's date handling (profiled: ~0.7 s of CPU per 100k rows).
const copyDate = (v: { y: number; mo: number; d: number } | null) => (v === null ? null : { y: v.y, mo: v.mo, d: v.d });

/** A date in the given order → {y, mo, d}, or null if it is no real calendar date. */
export function parseDate(text: string, order: DateOrder): { y: number; mo: number; d: number } | null {
  if (lastDate && lastDate.text === text && lastDate.order === order) return copyDate(lastDate.value);
  const value = readDate(text, order);
  lastDate = { text, order, value };
  return copyDate(value);
}

function readDate(text: string, order: DateOrder): { y: number; mo: number; d: number } | null {
  const t = text.trim();
  let y: number;
  let mo: number;
  let d: number;
  const iso = ISO_DATE.exec(t);
  if (iso) {
    y = Number(iso[1]);
    mo = Number(iso[2]);
    d = Number(iso[3]);
  } else {
    const m = NUMERIC_DATE.exec(t);
    if (!m) return null;
    const a = Number(m[1]);
    const b = Number(m[3]);
    y = fullYear(m[4] as string);
    [d, mo] = order === 'mdy' ? [b, a] : [a, b];
  }
  if (mo < 1 || mo > 12 || d < 1 || d > daysIn(y, mo)) return null;
  return { y, mo, d };
}

export function parseTime(text: string): { h: number; mi: number; s: number; ms: number } | null {
  const m = TIME.exec(text.trim());
  if (!m) return null;
  let h = Number(m[1]);
  const mi = Number(m[2]);
  const s = m[3] ? Number(m[3]) : 0;
  const ms = m[4] ? Math.round(Number(`0.${m[4]}`) * 1000) : 0;
  const ampm = m[5]?.toUpperCase();
  if (ampm) {
    if (h < 1 || h > 12) return null;
    h = (h % 12) + (ampm === 'PM' ? 12 : 0);
  }
  if (h > 23 || mi > 59 || s > 59) return null;
  return { h, mi, s, ms };
}

/**
 * Reads a date cell and an optional time cell (or one cell holding both) as wall-clock time.
 * Returns null with no usable date.
 */
export function parseWallTime(dateText: string, timeText: string | null, order: DateOrder): WallTime | null {
  let dt = dateText.trim();
  let tt = timeText?.trim() ?? '';
  if (!tt) {
    const split = splitDateTime(dt);
    if (split) {
      dt = split.date;
      tt = split.time;
    }
  }
  const date = parseDate(dt, order);
  if (!date) return null;
  const time = tt ? parseTime(tt) : { h: 0, mi: 0, s: 0, ms: 0 };
  if (!time) return null;
  return { y: date.y, mo: date.mo, d: date.d, h: time.h, mi: time.mi, s: time.s, ms: time.ms };
}

/**
 * Wall-clock time at a fixed offset from UTC (minutes east, as the browser reports it) → ISO instant.
 * A scale writes local time without a zone; the importer supplies the shop's offset.
 */
export function wallTimeToIso(w: WallTime, utcOffsetMinutes: number): string {
  const ms = Date.UTC(w.y, w.mo - 1, w.d, w.h, w.mi, w.s, w.ms) - utcOffsetMinutes * 60_000;
  return new Date(ms).toISOString();
}

/**
 * Which order the numeric dates of a sample are in. Evidence, strongest first:
 * a first field above 12 (day-first) or a second above 12 (month-first); then, if every date reads
 * both ways, the reading under which the rows' times run forward (a weighing log is written in time
 * order); then the separator (a dot, "01.03.2026", is the usual day-first style); then the file's decimal
 * comma (written where day-first dates are usual); finally month-first. Each of the last three is a rule
 * of thumb (common practice), and is reported as an assumption.
 */
export function inferDateOrder(samples: { date: string; time?: string | null }[], hints: { decimalComma?: boolean } = {}): DateOrderGuess {
  const numeric = samples
    .map((s) => {
      const split = s.time ? null : splitDateTime(s.date);
      return { date: split?.date ?? s.date.trim(), time: s.time ?? split?.time ?? null };
    })
    .filter((s) => NUMERIC_DATE.test(s.date));
  if (numeric.length === 0) {
    const anyIso = samples.some((s) => ISO_DATE.test((splitDateTime(s.date)?.date ?? s.date).trim()));
    return anyIso
      ? { order: 'ymd', assumed: false, reason: 'The dates are written year first (year-month-day)' }
      : { order: 'dmy', assumed: true, reason: 'No dates were found in the sample' };
  }
  let dayFirst = 0;
  let monthFirst = 0;
  let firstExample = '';
  for (const s of numeric) {
    const m = NUMERIC_DATE.exec(s.date) as RegExpExecArray;
    const a = Number(m[1]);
    const b = Number(m[3]);
    if (a > 12 && b <= 12) {
      dayFirst++;
      firstExample ||= s.date;
    } else if (b > 12 && a <= 12) {
      monthFirst++;
      firstExample ||= s.date;
    }
  }
  if (dayFirst > 0 && monthFirst === 0) {
    return { order: 'dmy', assumed: false, reason: `Day first: in ${firstExample} the first number is above 12, so it can only be the day` };
  }
  if (monthFirst > 0 && dayFirst === 0) {
    return { order: 'mdy', assumed: false, reason: `Month first: in ${firstExample} the second number is above 12, so it can only be the day` };
  }
  if (dayFirst > 0 && monthFirst > 0) {
    const order = dayFirst >= monthFirst ? 'dmy' : 'mdy';
    return {
      order,
      assumed: true,
      reason: `The dates disagree: ${dayFirst} can only be day-first and ${monthFirst} only month-first; ${order === 'dmy' ? 'day-first' : 'month-first'} was taken because more dates fit it. Check the file`,
    };
  }
  const backwards = (order: DateOrder) => {
    let prev = -Infinity;
    let n = 0;
    let distinct = 0;
    for (const s of numeric) {
      const w = parseWallTime(s.date, s.time, order);
      if (!w) return Infinity;
      const t = Date.UTC(w.y, w.mo - 1, w.d, w.h, w.mi, w.s, w.ms);
      if (t < prev) n++;
      if (t !== prev) distinct++;
      prev = t;
    }
    return distinct > 1 ? n : -1;
  };
  const bd = backwards('dmy');
  const bm = backwards('mdy');
  if (bd >= 0 && bm >= 0 && bd !== bm) {
    const order = bd < bm ? 'dmy' : 'mdy';
    const other = order === 'dmy' ? bm : bd;
    return {
      order,
      assumed: true,
      reason: `Every date reads both ways; ${order === 'dmy' ? 'day-first' : 'month-first'} was assumed because the rows then run forward in time (read the other way, time would jump back ${other} time${other === 1 ? '' : 's'})`,
    };
  }
  const sep = (NUMERIC_DATE.exec(numeric[0]!.date) as RegExpExecArray)[2];
  if (sep === '.')
    return {
      order: 'dmy',
      assumed: true,
      reason: 'Every date reads both ways; day-first was assumed because the dates are written with dots (01.03.2026), the usual day-first style',
    };
  if (hints.decimalComma)
    return {
      order: 'dmy',
      assumed: true,
      reason: 'Every date reads both ways; day-first was assumed because the file writes decimal commas, as places with day-first dates do',
    };
  return {
    order: 'mdy',
    assumed: true,
    reason: 'Every date reads both ways and nothing else in the file tells; month-first was assumed. Check a date you know',
  };
}
