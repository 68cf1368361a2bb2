import { formatClock, formatDateTime } from '../../../lib/format/dates';

/** "2 h 10 min", "25 min", "3 d 4 h": the coarsest two units, so a countdown stays readable. */
export function formatSpan(ms: number): string {
  const minutes = Math.round(Math.abs(ms) / 60_000);
  if (minutes < 1) return 'less than a minute';
  const d = Math.floor(minutes / 1440);
  const h = Math.floor((minutes % 1440) / 60);
  const m = minutes % 60;
  if (d > 0) return h > 0 ? `${d} d ${h} h` : `${d} d`;
  if (h > 0) return m > 0 ? `${h} h ${m} min` : `${h} h`;
  return `${m} min`;
}

/** "in 2 h 10 min" or "overdue by 25 min". */
export function relativeDue(dueAt: string, now: Date): string {
  const diff = Date.parse(dueAt) - now.getTime();
  return diff >= 0 ? `in ${formatSpan(diff)}` : `overdue by ${formatSpan(diff)}`;
}

/** A clock time in the browser's zone; the date too when it is not today. */
export const clockTime = formatClock;

/** Full date and time, for records. */
export const dateTime = formatDateTime;

/** A due time as the bench shows it: the clock time, then how far off it is. */
export function DueTime({ dueAt, now }: { dueAt: string; now: Date }) {
  const overdue = Date.parse(dueAt) < now.getTime();
  return (
    <span>
      <time dateTime={dueAt}>{clockTime(dueAt, now)}</time>{' '}
      <span className={overdue ? 'font-semibold text-margin' : 'text-ink-soft'}>({relativeDue(dueAt, now)})</span>
    </span>
  );
}
