import { describe, expect, it } from 'vitest';
import { isoDateProblem, readingDateQuestion } from './dates';
import { timestampSchema } from './runs';

// The calendar rules are the Gregorian calendar's as ISO 8601 uses it (leap year: divisible by 4, not by
// 100 unless by 400); hour 24 and second 60 are refused although ISO 8601:2004 allowed 24:00 and leap
// seconds, because a shop's scale never writes them (common practice).
describe('isoDateProblem', () => {
  it.each([
    ['2026-02-28T12:00:00Z', null],
    ['2024-02-29T12:00:00Z', null],
    ['2000-02-29', null],
    ['2026-12-31T23:59:59.999+05:30', null],
    ['2026-02-30T12:00:00Z', /has no day 30/],
    ['2023-02-29', /has no day 29/],
    ['1900-02-29', /has no day 29/],
    ['2026-04-31T08:00:00Z', /has no day 31/],
    ['2026-13-01T08:00:00Z', /no month 13/],
    ['2026-03-01T24:00:00Z', /no hour 24/],
    ['2026-03-01T12:60:00Z', /no minute 60/],
    ['2026-03-01T12:00:60Z', /no second 60/],
    ['2026-03-01T12:00:00+24:00', /no zone offset/],
    ['0001-03-01T12:00:00Z', /year 1 is not plausible/],
    ['9999-03-01T12:00:00Z', /year 9999 is not plausible/],
  ])('%s', (s, expected) => {
    const p = isoDateProblem(s);
    if (expected === null) expect(p).toBeNull();
    else expect(p).toMatch(expected);
  });

  it('the timestamp contract refuses what Date would silently shift', () => {
    expect(timestampSchema.safeParse('2026-02-30T12:00:00Z').success).toBe(false);
    expect(timestampSchema.safeParse('2026-03-01T24:00:00Z').success).toBe(false);
    expect(timestampSchema.parse('2026-03-01T14:30:00+01:00')).toBe('2026-03-01T13:30:00.000Z');
  });
});

describe('readingDateQuestion', () => {
  const now = new Date('2026-06-01T12:00:00Z');
  it('questions a reading in the future or long before the shop began, and lets ordinary ones be', () => {
    expect(readingDateQuestion('2026-06-01T12:30:00Z', now, '2026-01-01T00:00:00Z')).toBeNull();
    expect(readingDateQuestion('2026-06-03T12:00:00Z', now, '2026-01-01T00:00:00Z')).toMatch(/in the future/);
    expect(readingDateQuestion('2020-01-01T12:00:00Z', now, '2026-01-01T00:00:00Z')).toMatch(/before the shop's first record/);
    expect(readingDateQuestion('2025-06-01T12:00:00Z', now, '2026-01-01T00:00:00Z')).toBeNull();
  });
});
