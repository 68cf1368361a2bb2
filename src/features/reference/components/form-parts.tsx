import { useId, type ReactNode, type TextareaHTMLAttributes } from 'react';
import { ApiError } from '../../../lib/api-client';
import { zodResolver } from '@hookform/resolvers/zod';
import type { FieldErrors, FieldValues, Resolver, ResolverOptions, UseFormRegisterReturn } from 'react-hook-form';
import type { z } from 'zod';

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

interface TextAreaFieldProps extends Omit<TextareaHTMLAttributes<HTMLTextAreaElement>, 'name'> {
  label: string;
  registration: UseFormRegisterReturn;
  error?: string;
  hint?: ReactNode;
}

export function TextAreaField({ label, registration, error, hint, ...rest }: TextAreaFieldProps) {
  const id = useId();
  const hintId = hint ? `${id}-hint` : undefined;
  const errorId = error ? `${id}-error` : undefined;
  return (
    <div className="mb-4">
      <label htmlFor={id} className="field-label">
        {label}
      </label>
      <textarea
        id={id}
        rows={3}
        className="field-input"
        aria-invalid={error ? true : undefined}
        aria-describedby={[hintId, errorId].filter(Boolean).join(' ') || undefined}
        {...registration}
        {...rest}
      />
      {hint && (
        <p id={hintId} className="mt-1 text-xs text-ink-faint">
          {hint}
        </p>
      )}
      {error && (
        <p id={errorId} className="mt-1 text-sm text-margin" role="alert">
          {error}
        </p>
      )}
    </div>
  );
}

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
