import { ApiError } from './api-client';
import { numberInput, requiredNumberInput } from './forms/number-input';

// Helpers between what a person types in a form box and what a contract expects.

/** Number inputs (prefer `NumberField`): an empty box is "not given" (null), not zero; text is read by `parseNumber`. */
export const numberOrNull = numberInput;
/** For required numbers: an empty box is missing (undefined), and the contract names the field. */
export const numberOrMissing = requiredNumberInput;
/** Optional text: an empty box is null rather than "". */
export const textOrNull = { setValueAs: (v: unknown) => (typeof v === 'string' && v.trim() === '' ? null : v) };

/** Shows "—" for a value nobody gave. */
export function dash(v: number | string | null | undefined): string {
  return v === null || v === undefined || v === '' ? '—' : String(v);
}

/** The calendar date of a stored date or timestamp, as written in the record (YYYY-MM-DD). */
export function isoDay(v: string): string {
  return v.slice(0, 10);
}

/** The same server error with its field names moved to the names of the boxes the user typed in. */
export function renameFields(err: unknown, names: Record<string, string>): unknown {
  if (!(err instanceof ApiError)) return err;
  const fieldErrors = Object.fromEntries(Object.entries(err.fieldErrors).map(([k, v]) => [names[k] ?? k, v]));
  return new ApiError(err.status, err.code, err.message, fieldErrors, err.requestId);
}
