import { describe, expect, it } from 'vitest';
import { inferDateOrder, isoString, parseDate, parseTime, parseWallTime, readingInstant, splitDateTime, wallTimeToIso, type DateOrder } from './dates';

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

describe('fast paths of a reading time', () => {
  // A fixed linear congruential sequence (Numerical Recipes' constants): the same inputs on every run.
  let seed = 2026;
  const next = () => (seed = (seed * 1664525 + 1013904223) >>> 0) / 2 ** 32;

  it('writes an instant as toISOString does', () => {
    const edges = [
      0,
      1,
      999,
      1000,
      86_399_999,
      86_400_000,
      Date.UTC(2000, 1, 29, 23, 59, 59, 999),
      Date.UTC(2100, 2, 1),
      Date.UTC(9999, 11, 31, 23, 59, 59, 999),
    ];
    for (const ms of edges) expect(isoString(ms)).toBe(new Date(ms).toISOString());
    const wrong: number[] = [];
    for (let k = 0; k < 50_000; k++) {
      const ms = Math.floor(next() * Date.UTC(9999, 11, 31, 23, 59, 59, 999));
      // Each instant twice (the second answer is the cached string), and the next millisecond of the same day.
      for (const x of [ms, ms, ms + 1]) if (isoString(x) !== new Date(x).toISOString()) wrong.push(x);
    }
    expect(wrong).toEqual([]);
    // Outside 1970–9999 it is toISOString's answer too (signed six-digit years before 0000 and after 9999).
    for (const ms of [-1, Date.UTC(1969, 11, 31, 23, 59, 59), Date.UTC(-5, 0, 1), Date.UTC(10000, 0, 1), 0.5])
      expect(isoString(ms)).toBe(new Date(ms).toISOString());
  });

  const general = (d: string, t: string | null, order: DateOrder, offset: number) => {
    const w = parseWallTime(d, t, order);
    return w ? wallTimeToIso(w, offset) : null;
  };

  it('reads a date and a time as parseWallTime then wallTimeToIso do, on tricky inputs', () => {
    // prettier-ignore
    const dates = ['2026-03-02', '2026-3-2', '2026/03/02', '02/03/2026', '03/02/26', '2.3.2026', '2026-02-29', '2024-02-29', '2026-13-01',
      '0026-03-02', '0000-01-01', '9999-12-31', ' 2026-03-02', '2026-03-02 ', '', 'x', '2026-03-02 08:00:00', '2026-03-02T08:00:00',
      '2026-03-02T08:00:00Z', '2026-03-02 8:00:00', '2026-03-02 08:00', '2026-03-02 24:00:00', '2026-02-30 08:00:00', '02/03/2026 08:00:00',
      '2026-03-02,08:00:00', '2026-03-02  08:00:00', '2026-03-02 08:00:00 PM', '2026-03-02X08:00:00', '2026-0a-02 08:00:00'];
    // prettier-ignore
    const times = [null, '', '08:00:00', '8:00:00', '08:00', '8:00', '23:59:59', '24:00:00', '23:60:00', '23:59:60', '08:00:00.5',
      '08:00:00,250', '08:00 PM', '12:00 AM', ' 08:00:00', '08:00:00 ', '08:0', '08:00:0', '08:00:000', '080000', 'x', '123:00', '1:2:3'];
    for (const order of ['ymd', 'dmy', 'mdy'] as const)
      for (const offset of [0, 60, -330, 840])
        for (const d of dates)
          for (const t of times) expect(readingInstant(d, t, order, offset), `${d} | ${t} | ${order} | ${offset}`).toBe(general(d, t, order, offset));
  });

  it('reads rows of a log (a date repeated, the time moving on) as the general path does', () => {
    let day = Date.UTC(2026, 0, 1);
    const wrong: string[] = [];
    for (let k = 0; k < 20_000; k++) {
      if (next() < 0.01) day += 86_400_000 * Math.floor(1 + next() * 40);
      const at = new Date(day + Math.floor(next() * 86_400) * 1000);
      const iso = at.toISOString();
      const d = next() < 0.5 ? iso.slice(0, 10) : `${iso.slice(8, 10)}/${iso.slice(5, 7)}/${iso.slice(0, 4)}`;
      const order: DateOrder = d.includes('/') ? 'dmy' : 'ymd';
      const t = iso.slice(11, 19);
      const offset = next() < 0.5 ? 0 : 120;
      if (readingInstant(d, t, order, offset) !== general(d, t, order, offset)) wrong.push(`${d} | ${t}`);
      if (readingInstant(`${d} ${t}`, null, order, offset) !== general(`${d} ${t}`, null, order, offset)) wrong.push(`${d} ${t}`);
    }
    expect(wrong).toEqual([]);
  });
});
