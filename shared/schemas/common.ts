import { z } from 'zod';
import { ERROR_CODES } from '../constants/errors';

export const errorEnvelopeSchema = z.object({
  error: z.object({
    code: z.enum(ERROR_CODES),
    message: z.string(),
    fieldErrors: z.record(z.string(), z.array(z.string())).optional(),
    requestId: z.string().optional(),
  }),
});
export type ErrorEnvelope = z.infer<typeof errorEnvelopeSchema>;

/** `?page=&pageSize=&sort=` for every list. `sort` is a field name, `-field` for descending. */
export const listQuerySchema = z.strictObject({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
  sort: z
    .string()
    .max(40)
    .regex(/^-?[a-zA-Z]+$/, 'sort is a field name, optionally prefixed with -')
    .optional(),
});
export type ListQuery = z.infer<typeof listQuerySchema>;

export function listResponseSchema<T extends z.ZodType>(item: T) {
  return z.object({
    items: z.array(item),
    page: z.number().int(),
    pageSize: z.number().int(),
    total: z.number().int(),
  });
}

export const idParamsSchema = z.strictObject({ id: z.coerce.number().int().positive() });

export const emailSchema = z
  .email('Enter a valid e-mail address')
  .max(254)
  .transform((s) => s.toLowerCase());
/** UTF-8 length of a string, counted by code point (no TextEncoder: shared code uses no platform globals). */
export function utf8Bytes(s: string): number {
  let n = 0;
  for (const ch of s) {
    const cp = ch.codePointAt(0) ?? 0;
    n += cp < 0x80 ? 1 : cp < 0x800 ? 2 : cp < 0x10000 ? 3 : 4;
  }
  return n;
}

/** bcrypt uses only the first 72 bytes of a password; a longer one would be silently cut, so it is refused. */
export const PASSWORD_MAX_BYTES = 72;

export const passwordSchema = z
  .string()
  .min(12, 'Use at least 12 characters')
  .max(200, 'Use at most 200 characters')
  .refine((s) => utf8Bytes(s) <= PASSWORD_MAX_BYTES, {
    message: `Use at most ${PASSWORD_MAX_BYTES} bytes (72 plain letters; accented letters and symbols count two to four)`,
  });
export const nameSchema = z.string().trim().min(1, 'Enter a name').max(120);

/**
 * A shop's altitude, metres (stored SI; forms show it in the user's altitude unit). Below the lowest dry
 * land, or above the 5,000 m to which the vacuum arithmetic is trusted, it is a slip.
 */
export const altitudeMSchema = z
  .number()
  .min(-430, 'Below the lowest dry land on Earth (−430 m, −1,411 ft)')
  .max(5000, 'Above 5,000 m (16,404 ft) the air pressure model used does not hold');
