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

const DAY_MS = 86_400_000;
/** 10000-01-01T00:00:00Z: from here on toISOString writes a six-digit year with a sign. */
const YEAR_10000_MS = 253_402_300_800_000;

/** The last day formatted by isoString, as the character codes of "YYYY-MM-DD". */
let isoDay = NaN;
let y0 = 0, y1 = 0, y2 = 0, y3 = 0, m0 = 0, m1 = 0, d0 = 0, d1 = 0; // prettier-ignore
/** The last instant formatted, and its text: rows of one time share one string. */
let isoLastMs = NaN;
let isoLast = '';

/**
 * `new Date(ms).toISOString()` for an instant of the years 1970–9999, written by arithmetic into one flat
 * string (toISOString cost ~1 µs a call, a tenth of a 100,000-row preview); other instants go to
 * toISOString. The date from days since the epoch by the civil-from-days algorithm (H. Hinnant,
 * "chrono-compatible low-level date algorithms", proleptic Gregorian calendar, as ECMAScript's Date uses).
 * dates.test.ts compares it with toISOString over many instants.
 */
export function isoString(ms: number): string {
  if (ms === isoLastMs) return isoLast;
  if (!(ms >= 0 && ms < YEAR_10000_MS) || !Number.isInteger(ms)) return new Date(ms).toISOString();
  const day = Math.floor(ms / DAY_MS);
  if (day !== isoDay) {
    const z = day + 719_468;
    const era = Math.floor(z / 146_097);
    const doe = z - era * 146_097;
    const yoe = Math.floor((doe - Math.floor(doe / 1460) + Math.floor(doe / 36_524) - Math.floor(doe / 146_096)) / 365);
    const doy = doe - (365 * yoe + Math.floor(yoe / 4) - Math.floor(yoe / 100));
    const mp = Math.floor((5 * doy + 2) / 153);
    const d = doy - Math.floor((153 * mp + 2) / 5) + 1;
    const m = mp < 10 ? mp + 3 : mp - 9;
    const y = yoe + era * 400 + (m <= 2 ? 1 : 0);
    y0 = 48 + Math.floor(y / 1000);
    y1 = 48 + (Math.floor(y / 100) % 10);
    y2 = 48 + (Math.floor(y / 10) % 10);
    y3 = 48 + (y % 10);
    m0 = 48 + Math.floor(m / 10);
    m1 = 48 + (m % 10);
    d0 = 48 + Math.floor(d / 10);
    d1 = 48 + (d % 10);
    isoDay = day;
  }
  let t = ms - day * DAY_MS;
  const milli = t % 1000;
  t = (t - milli) / 1000;
  const s = t % 60;
  t = (t - s) / 60;
  const mi = t % 60;
  const h = (t - mi) / 60;
  // prettier-ignore
  const text = String.fromCharCode(
    y0, y1, y2, y3, 45, m0, m1, 45, d0, d1, 84,
    48 + Math.floor(h / 10), 48 + (h % 10), 58, 48 + Math.floor(mi / 10), 48 + (mi % 10), 58, 48 + Math.floor(s / 10), 48 + (s % 10), 46,
    48 + Math.floor(milli / 100), 48 + (Math.floor(milli / 10) % 10), 48 + (milli % 10), 90,
  );
  isoLastMs = ms;
  isoLast = text;
  return text;
}

/**
 * Milliseconds into the day of a time written "H:MM", "HH:MM", "H:MM:SS" or "HH:MM:SS" exactly (no
 * spaces, fractions or AM/PM) and in range; -1 for anything else, which parseTime then reads.
 */
function plainClock(t: string): number {
  // No helper closures here: tsx names each closure it creates (a defineProperty per call).
  const n = t.length;
  let i = 1;
  let h = t.charCodeAt(0) - 48;
  if (!(h >= 0 && h <= 9)) return -1;
  const h2 = t.charCodeAt(1) - 48;
  if (h2 >= 0 && h2 <= 9) {
    h = h * 10 + h2;
    i = 2;
  }
  const mi = twoDigits(t, i);
  if (mi < 0) return -1;
  i += 3;
  let s = 0;
  if (i < n) {
    s = twoDigits(t, i);
    if (s < 0 || i + 3 !== n) return -1;
  }
  if (h > 23 || mi > 59 || s > 59) return -1;
  return ((h * 60 + mi) * 60 + s) * 1000;
}

/** The number of ":DD" at t[i], or -1. */
function twoDigits(t: string, i: number): number {
  if (t.charCodeAt(i) !== 58) return -1;
  const a = t.charCodeAt(i + 1) - 48;
  const b = t.charCodeAt(i + 2) - 48;
  return a >= 0 && a <= 9 && b >= 0 && b <= 9 ? a * 10 + b : -1;
}

/** "YYYY-MM-DD" with digits at its first ten characters. */
function isoDateAt(t: string): boolean {
  for (let i = 0; i < 10; i++) {
    const ch = t.charCodeAt(i);
    if (i === 4 || i === 7 ? ch !== 45 : ch < 48 || ch > 57) return false;
  }
  return true;
}

/** The last date cell read by readingInstant, and its day's start (Date.UTC), null when it is no date. */
let dayText = '';
let dayOrder: DateOrder | null = null;
let dayStart: number | null = null;

/**
 * A row's date cell and time cell (or one cell holding both) → the ISO instant, or null with no usable
 * date or time: exactly `parseWallTime` then `wallTimeToIso`, which it falls back to, but the common
 * shapes (a time "HH:MM:SS", a date repeated from the row before, "YYYY-MM-DD HH:MM:SS" in one cell)
 * are read without building objects. dates.test.ts compares both paths.
 */
export function readingInstant(dateText: string, timeText: string | null, order: DateOrder, utcOffsetMinutes: number): string | null {
  let date = dateText;
  let clock = -1;
  if (timeText) clock = plainClock(timeText);
  else if (dateText.length === 19 && (dateText.charCodeAt(10) === 32 || dateText.charCodeAt(10) === 84) && isoDateAt(dateText)) {
    clock = plainClock(dateText.slice(11));
    date = dateText.slice(0, 10);
  }
  if (clock < 0) {
    const w = parseWallTime(dateText, timeText, order);
    return w ? wallTimeToIso(w, utcOffsetMinutes) : null;
  }
  if (date !== dayText || order !== dayOrder) {
    const d = parseDate(date.trim(), order);
    dayText = date;
    dayOrder = order;
    dayStart = d ? Date.UTC(d.y, d.mo - 1, d.d) : null;
  }
  return dayStart === null ? null : isoString(dayStart + clock - utcOffsetMinutes * 60_000);
}
