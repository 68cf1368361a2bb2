// The one place the client turns stored instants into words and back, on Intl in the browser's own
// language and time zone. Stored values are ISO instants (UTC); what a person sees and types is local.

const cache = new Map<string, Intl.DateTimeFormat>();
function fmt(key: string, options: Intl.DateTimeFormatOptions): Intl.DateTimeFormat {
  let f = cache.get(key);
  if (!f) {
    f = new Intl.DateTimeFormat(undefined, options);
    cache.set(key, f);
  }
  return f;
}

const valid = (d: Date) => Number.isFinite(d.getTime());

/** "2 Dec 2026, 09:30": an instant in a record (weighings, history, mail). */
export function formatDateTime(iso: string | Date): string {
  const d = new Date(iso);
  return valid(d) ? fmt('datetime', { year: 'numeric', month: 'short', day: 'numeric', hour: '2-digit', minute: '2-digit' }).format(d) : '—';
}

/** "2 Dec 2026": a calendar day. A plain `YYYY-MM-DD` is that day wherever the reader is, not shifted by zone. */
export function formatDate(value: string | Date): string {
  const d = typeof value === 'string' && /^\d{4}-\d{2}-\d{2}$/.test(value) ? new Date(`${value}T12:00:00`) : new Date(value);
  return valid(d) ? fmt('date', { year: 'numeric', month: 'short', day: 'numeric' }).format(d) : '—';
}

/** "09:30" today, "Wed 3 Dec 09:30" on another day: a time on the bench. */
export function formatClock(iso: string | Date, now: Date = new Date()): string {
  const d = new Date(iso);
  if (!valid(d)) return '—';
  const time = fmt('time', { hour: '2-digit', minute: '2-digit' }).format(d);
  const sameDay = d.getFullYear() === now.getFullYear() && d.getMonth() === now.getMonth() && d.getDate() === now.getDate();
  return sameDay ? time : `${fmt('weekday', { weekday: 'short', day: 'numeric', month: 'short' }).format(d)} ${time}`;
}

const pad = (n: number) => String(n).padStart(2, '0');

/** The value of an `<input type="datetime-local">` (local wall time, to the minute) for an instant. */
export function toLocalInput(iso: string | Date = new Date()): string {
  const d = new Date(iso);
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}T${pad(d.getHours())}:${pad(d.getMinutes())}`;
}

/** A datetime-local value, read in the browser's zone, as an ISO instant; null when empty or unreadable. */
export function fromLocalInput(value: string | null | undefined): string | null {
  if (!value) return null;
  const t = new Date(value).getTime();
  return Number.isFinite(t) ? new Date(t).toISOString() : null;
}

/** Today's local date as `YYYY-MM-DD`, for an `<input type="date">`. */
export function todayLocalDate(now: Date = new Date()): string {
  return `${now.getFullYear()}-${pad(now.getMonth() + 1)}-${pad(now.getDate())}`;
}
