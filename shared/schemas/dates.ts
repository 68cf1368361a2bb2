import { z } from 'zod';

const ISO = /^(\d{4})-(\d{2})-(\d{2})(?:T(\d{2}):(\d{2})(?::(\d{2})(?:\.\d{1,9})?)?(Z|([+-])(\d{2}):?(\d{2}))?)?$/;

/** Earliest and latest year a shop's record can carry; outside them a date is a typing slip. */
export const YEAR_MIN = 1900;
export const YEAR_MAX = 2199;

/** Days in a month of the proleptic Gregorian calendar (leap years: divisible by 4, not by 100 unless by 400). */
function daysIn(year: number, month: number): number {
  if (month === 2) return (year % 4 === 0 && year % 100 !== 0) || year % 400 === 0 ? 29 : 28;
  return [4, 6, 9, 11].includes(month) ? 30 : 31;
}

/**
 * Why an ISO 8601 date or date-time is not a real moment, or null when it is. JavaScript's Date quietly
 * rolls `2026-02-30` over to 2 March and `T24:00` to the next day; here every written field must be the
 * one it denotes (it round-trips): month 1–12, a day the month has, hour 0–23, minute and second 0–59,
 * a zone offset within ±23:59, and a year from 1900 to 2199.
 */
export function isoDateProblem(s: string): string | null {
  const m = ISO.exec(s);
  if (!m) return 'Not an ISO date or date-time';
  const [year, month, day] = [Number(m[1]), Number(m[2]), Number(m[3])];
  if (month < 1 || month > 12) return `There is no month ${m[2]}`;
  if (day < 1 || day > daysIn(year, month)) return `${m[1]}-${m[2]} has no day ${m[3]}`;
  if (m[4] !== undefined && Number(m[4]) > 23) return `There is no hour ${m[4]} (use 00 of the next day)`;
  if (m[5] !== undefined && Number(m[5]) > 59) return `There is no minute ${m[5]}`;
  if (m[6] !== undefined && Number(m[6]) > 59) return `There is no second ${m[6]}`;
  if (m[9] !== undefined && (Number(m[9]) > 23 || Number(m[10]) > 59)) return `There is no zone offset ${m[7]}`;
  if (year < YEAR_MIN || year > YEAR_MAX) return `The year ${year} is not plausible for a shop record (${YEAR_MIN}–${YEAR_MAX})`;
  return null;
}

/** A string that must be a real date or date-time (see isoDateProblem); pipe it into the format's own check. */
export const realIsoDate = (message?: string) =>
  z.string().superRefine((s, ctx) => {
    const problem = isoDateProblem(s);
    if (problem) ctx.addIssue({ code: 'custom', message: message ? `${message}: ${problem}` : problem });
  });

/**
 * How a reading's date deserves a second look, or null: in the future (beyond an hour of clock
 * difference between the bench and the server), or before the shop's first record. It is kept, and the
 * question shown beside it (common practice: an entry slip is more likely than a time machine).
 */
export function readingDateQuestion(measuredAt: string, now: Date, firstRecordAt: string | null): string | null {
  const t = Date.parse(measuredAt);
  if (t > now.getTime() + 3600_000) return `Dated ${measuredAt.slice(0, 16).replace('T', ' ')}, in the future: check the date`;
  if (firstRecordAt && t < Date.parse(firstRecordAt) - 366 * 24 * 3600_000) {
    return `Dated ${measuredAt.slice(0, 10)}, more than a year before the shop's first record (${firstRecordAt.slice(0, 10)}): check the date`;
  }
  return null;
}
