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

function sameDay(a: Date, b: Date): boolean {
  return a.getFullYear() === b.getFullYear() && a.getMonth() === b.getMonth() && a.getDate() === b.getDate();
}

/** A clock time in the browser's zone; the date too when it is not today. */
export function clockTime(iso: string, now: Date = new Date()): string {
  const d = new Date(iso);
  const time = d.toLocaleTimeString(undefined, { hour: '2-digit', minute: '2-digit' });
  if (sameDay(d, now)) return time;
  return `${d.toLocaleDateString(undefined, { weekday: 'short', day: 'numeric', month: 'short' })} ${time}`;
}

/** Full date and time, for records. */
export function dateTime(iso: string): string {
  return new Date(iso).toLocaleString(undefined, { year: 'numeric', month: 'short', day: 'numeric', hour: '2-digit', minute: '2-digit' });
}

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

/** `<input type="datetime-local">` value (local wall time, minutes) for an ISO instant. */
export function toLocalInput(iso: string | Date): string {
  const d = typeof iso === 'string' ? new Date(iso) : iso;
  const pad = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}T${pad(d.getHours())}:${pad(d.getMinutes())}`;
}

/** A datetime-local value, read in the browser's zone, as an ISO instant with its zone; null when empty or unreadable. */
export function fromLocalInput(value: string): string | null {
  if (!value) return null;
  const t = new Date(value).getTime();
  return Number.isFinite(t) ? new Date(t).toISOString() : null;
}
