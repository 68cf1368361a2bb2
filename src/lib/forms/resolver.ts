import { zodResolver } from '@hookform/resolvers/zod';
import type { FieldError, FieldErrors, FieldValues, Resolver, ResolverOptions } from 'react-hook-form';
import type { z } from 'zod';
import { NOT_A_NUMBER } from './parse-number';

/** Paths (`['readings', 0, 'gaugeValue']`) of the numbers in a value that are NaN: boxes whose text is not a number. */
export function notANumberPaths(value: unknown, path: (string | number)[] = []): (string | number)[][] {
  if (typeof value === 'number') return Number.isNaN(value) ? [path] : [];
  if (Array.isArray(value)) return value.flatMap((v, i) => notANumberPaths(v, [...path, i]));
  if (value && typeof value === 'object') return Object.entries(value).flatMap(([k, v]) => notANumberPaths(v, [...path, k]));
  return [];
}

/** The field errors in a nested error object, with their paths. */
function errorLeaves(errors: unknown, path: (string | number)[] = []): [(string | number)[], FieldError][] {
  if (!errors || typeof errors !== 'object') return [];
  if ('message' in errors && 'type' in errors) return [[path, { type: String(errors.type), message: String(errors.message ?? '') }]];
  return Object.entries(errors).flatMap(([k, v]) => errorLeaves(v, [...path, Array.isArray(errors) ? Number(k) : k]));
}

function setPath(target: Record<string, unknown>, path: (string | number)[], error: FieldError): void {
  if (path.length === 0) path = ['root'];
  let node: Record<string | number, unknown> = target;
  path.forEach((key, i) => {
    if (i === path.length - 1) node[key] = error;
    else {
      node[key] ??= typeof path[i + 1] === 'number' ? [] : {};
      node = node[key] as Record<string | number, unknown>;
    }
  });
}

/**
 * The one resolver of every form: converts what was typed into the contract's input (`convert`: display
 * units to SI, boxes of our own to the contract's fields), checks it with the SAME zod contract the server
 * uses, and puts each message on the box it came from (`rename`: contract field → form field). A number box
 * whose text is not a number (NaN from `parseNumber`) gets "Enter a number" before the contract is asked,
 * and `required` gives a plain message to a contract field left empty ("Enter the mass") instead of zod's.
 */
export function convertingResolver<TForm extends FieldValues, TSchema extends z.ZodType<FieldValues, FieldValues>>(
  schema: TSchema,
  convert: (values: TForm) => unknown = (values) => values,
  rename: Record<string, string> = {},
  required: Record<string, string> = {},
): Resolver<TForm, unknown, z.output<TSchema>> {
  const contract: z.ZodType<FieldValues, FieldValues> = schema;
  const check = zodResolver(contract);
  // `rename` keys are contract paths, whole (`weighing.massG`) or a leading part (`cureMinC`, `weighing`).
  const renamed = (path: (string | number)[]): (string | number)[] => {
    for (let n = path.length; n > 0; n--) {
      const to = rename[path.slice(0, n).join('.')];
      if (to !== undefined) return [...to.split('.'), ...path.slice(n)];
    }
    return path.length ? path : ['root'];
  };
  return async (values, ctx, options) => {
    const input = convert(values);
    const errors: Record<string, unknown> = {};
    for (const path of notANumberPaths(input)) setPath(errors, renamed(path), { type: 'number', message: NOT_A_NUMBER });
    const given = (input ?? {}) as Record<string, unknown>;
    for (const [field, message] of Object.entries(required)) {
      const to = renamed([field]);
      if ((given[field] === undefined || given[field] === null || given[field] === '') && !errors[String(to[0])])
        setPath(errors, to, { type: 'required', message });
    }
    if (Object.keys(errors).length > 0) return { values: {}, errors: errors as FieldErrors<TForm> };
    const result = await check(input as FieldValues, ctx, options as unknown as ResolverOptions<FieldValues>);
    if (Object.keys(result.errors).length === 0) return { values: result.values as z.output<TSchema>, errors: {} };
    for (const [path, error] of errorLeaves(result.errors)) setPath(errors, renamed(path), error);
    return { values: {}, errors: errors as FieldErrors<TForm> };
  };
}
