import { describe, expect, it } from 'vitest';
import { formatClock, formatDate, formatDateTime, fromLocalInput, toLocalInput, todayLocalDate } from './dates';

describe('dates', () => {
  it('round-trips a datetime-local value through an instant', () => {
    const local = '2026-03-14T09:26';
    const iso = fromLocalInput(local);
    expect(iso).not.toBeNull();
    expect(toLocalInput(iso!)).toBe(local);
  });

  it('reads empty or unreadable boxes as nothing', () => {
    expect(fromLocalInput('')).toBeNull();
    expect(fromLocalInput('not a time')).toBeNull();
    expect(formatDateTime('nope')).toBe('—');
  });

  it('shows a calendar day as that day, whatever the zone', () => {
    expect(formatDate('2026-03-14')).toBe(
      new Intl.DateTimeFormat(undefined, { year: 'numeric', month: 'short', day: 'numeric' }).format(new Date(2026, 2, 14)),
    );
    expect(todayLocalDate(new Date(2026, 0, 5, 23, 59))).toBe('2026-01-05');
  });

  it('adds the day to a clock time only when it is not today', () => {
    const now = new Date(2026, 2, 14, 12, 0);
    const time = new Intl.DateTimeFormat(undefined, { hour: '2-digit', minute: '2-digit' }).format(new Date(2026, 2, 14, 9, 5));
    expect(formatClock(new Date(2026, 2, 14, 9, 5), now)).toBe(time);
    expect(formatClock(new Date(2026, 2, 13, 9, 5), now)).not.toBe(time);
    expect(formatClock(new Date(2026, 2, 13, 9, 5), now).endsWith(time)).toBe(true);
  });
});
