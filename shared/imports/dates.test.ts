import { describe, expect, it } from 'vitest';
import { inferDateOrder, parseDate, parseTime, parseWallTime, splitDateTime, wallTimeToIso } from './dates';

describe('dates and times', () => {
  it('reads dates in each order and refuses impossible ones', () => {
    expect(parseDate('2026-03-01', 'dmy')).toEqual({ y: 2026, mo: 3, d: 1 });
    expect(parseDate('01/03/2026', 'dmy')).toEqual({ y: 2026, mo: 3, d: 1 });
    expect(parseDate('01/03/2026', 'mdy')).toEqual({ y: 2026, mo: 1, d: 3 });
    expect(parseDate('1.3.26', 'dmy')).toEqual({ y: 2026, mo: 3, d: 1 });
    expect(parseDate('31/02/2026', 'dmy')).toBeNull();
    // 2024 is a leap year (Gregorian rule: divisible by 4, not by 100 unless by 400); 2026 is not.
    expect(parseDate('29/02/2024', 'dmy')).toEqual({ y: 2024, mo: 2, d: 29 });
    expect(parseDate('29/02/2026', 'dmy')).toBeNull();
    expect(parseDate('13/13/2026', 'dmy')).toBeNull();
  });

  it('reads times, with seconds, fractions and AM/PM', () => {
    expect(parseTime('09:15')).toEqual({ h: 9, mi: 15, s: 0, ms: 0 });
    expect(parseTime('09:15:07.25')).toEqual({ h: 9, mi: 15, s: 7, ms: 250 });
    expect(parseTime('12:05 AM')).toEqual({ h: 0, mi: 5, s: 0, ms: 0 });
    expect(parseTime('1:05:00 pm')).toEqual({ h: 13, mi: 5, s: 0, ms: 0 });
    expect(parseTime('24:00')).toBeNull();
    expect(parseTime('13:00 PM')).toBeNull();
  });

  it('splits a date and time held in one cell', () => {
    expect(splitDateTime('2026-03-01 10:04:05')).toEqual({ date: '2026-03-01', time: '10:04:05' });
    expect(splitDateTime('2026-03-01T10:04:05Z')).toEqual({ date: '2026-03-01', time: '10:04:05' });
    expect(splitDateTime('01/03/2026, 10:04')).toEqual({ date: '01/03/2026', time: '10:04' });
    expect(splitDateTime('10:04')).toBeNull();
  });

  it('turns wall time at a UTC offset into an instant', () => {
    const w = parseWallTime('01.03.2026', '10:00', 'dmy')!;
    expect(wallTimeToIso(w, 60)).toBe('2026-03-01T09:00:00.000Z');
    expect(wallTimeToIso(w, -300)).toBe('2026-03-01T15:00:00.000Z');
  });
});

describe('inferDateOrder says what it assumed and why', () => {
  it('knows day-first when a first field is above 12', () => {
    const g = inferDateOrder([{ date: '03/02/2026' }, { date: '25/02/2026' }]);
    expect(g).toMatchObject({ order: 'dmy', assumed: false });
    expect(g.reason).toMatch(/25\/02\/2026/);
  });

  it('knows month-first when a second field is above 12', () => {
    expect(inferDateOrder([{ date: '02/25/2026 10:00' }])).toMatchObject({ order: 'mdy', assumed: false });
  });

  it('reads year-first dates without assuming', () => {
    expect(inferDateOrder([{ date: '2026-03-01' }])).toMatchObject({ order: 'ymd', assumed: false });
  });

  it('uses the time order when every date reads both ways', () => {
    // 1 Feb, 1 Mar, 1 Apr read day-first; month-first would give 2 Jan, 3 Jan, 4 Jan … and jump back here.
    const rows = ['01/02/2026', '01/03/2026', '02/03/2026', '01/04/2026'].map((date) => ({ date, time: '10:00' }));
    const g = inferDateOrder(rows);
    expect(g).toMatchObject({ order: 'dmy', assumed: true });
    expect(g.reason).toMatch(/run forward in time/);
  });

  it('falls back on dots, then decimal commas, then month-first, saying so', () => {
    const same = [{ date: '01.02.2026' }, { date: '01.02.2026' }];
    expect(inferDateOrder(same)).toMatchObject({ order: 'dmy', assumed: true });
    expect(inferDateOrder(same).reason).toMatch(/dots/);
    const slashes = [{ date: '01/02/2026' }, { date: '01/02/2026' }];
    expect(inferDateOrder(slashes, { decimalComma: true })).toMatchObject({ order: 'dmy', assumed: true });
    expect(inferDateOrder(slashes)).toMatchObject({ order: 'mdy', assumed: true });
  });

  it('says when the dates disagree', () => {
    const g = inferDateOrder([{ date: '25/02/2026' }, { date: '26/02/2026' }, { date: '02/27/2026' }]);
    expect(g).toMatchObject({ order: 'dmy', assumed: true });
    expect(g.reason).toMatch(/disagree/);
  });
});
