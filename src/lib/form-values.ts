import { zodResolver } from '@hookform/resolvers/zod';
import type { FieldErrors, FieldValues, Resolver, ResolverOptions } from 'react-hook-form';
import type { z } from 'zod';
import { ApiError } from './api-client';

// Helpers between what a person types in a form box and what a contract expects.

/** Number inputs: an empty box is "not given" (null), not zero and not NaN, so the contract can say which. */
export const numberOrNull = {
  setValueAs: (v: unknown) => (v === '' || v === null || v === undefined ? null : typeof v === 'number' ? v : Number(v)),
};
/** For required numbers: an empty box is missing, and the contract names the field. */
export const numberOrMissing = {
  setValueAs: (v: unknown) => (v === '' || v === null || v === undefined ? undefined : typeof v === 'number' ? v : Number(v)),
};
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

/**
 * A resolver that converts what was typed (display units, boxes of our own) into the contract's
 * input, checks it with the same zod contract the server uses, and puts each error back on the box
 * it came from (`rename`: contract field → form field).
 */
export function convertingResolver<TForm extends FieldValues, TSchema extends z.ZodType<FieldValues, FieldValues>>(
  schema: TSchema,
  convert: (values: TForm) => unknown,
  rename: Record<string, string> = {},
): Resolver<TForm, unknown, z.output<TSchema>> {
  const check = zodResolver(schema as never) as unknown as Resolver<FieldValues, unknown, z.output<TSchema>>;
  return async (values, ctx, options) => {
    const result = await check(convert(values) as FieldValues, ctx, options as unknown as ResolverOptions<FieldValues>);
    if (Object.keys(result.errors).length === 0) return { values: result.values as z.output<TSchema>, errors: {} };
    const errors: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(result.errors)) errors[rename[k] ?? k] = v;
    return { values: {}, errors: errors as FieldErrors<TForm> };
  };
}
