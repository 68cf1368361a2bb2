import type { z } from 'zod';

/**
 * zod issues → `{ "field.path": [messages] }`; unknown keys are reported on the key itself. The map has
 * no prototype: a client's key named `constructor` or `__proto__` must land as a field, not on
 * Object.prototype's members.
 */
export function zodFieldErrors(error: z.ZodError): Record<string, string[]> {
  const out = Object.create(null) as Record<string, string[]>;
  for (const issue of error.issues) {
    const keys = issue.code === 'unrecognized_keys' ? issue.keys.map((k) => [...issue.path, k]) : [issue.path];
    for (const p of keys) {
      const field = p.length ? p.map(String).join('.') : '_';
      const message = issue.code === 'unrecognized_keys' ? 'Unknown field' : issue.message;
      (out[field] ??= []).push(message);
    }
  }
  return out;
}
