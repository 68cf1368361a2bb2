import { z } from 'zod';

/**
 * Light picker answers: `GET /api/{trials,runs,species,resins,resin-lots}/options`. A picker needs an id
 * to send and words to show, not the full record with its progress and rule checks, so these stay small
 * and cheap at any size of the shop's history.
 */
export const optionsQuerySchema = z.strictObject({
  /** Contains, case-insensitive, in the code or the label. */
  q: z.string().trim().max(80, 'Use at most 80 characters').optional(),
  limit: z.coerce.number().int().min(1).max(1000).default(500),
});
export type OptionsQuery = z.infer<typeof optionsQuerySchema>;

export const optionSchema = z.object({
  id: z.number().int(),
  /** The record's short code (trial, run, lot code; species' botanical name; resin name). */
  code: z.string(),
  /** What a picker shows. */
  label: z.string(),
});
export type Option = z.infer<typeof optionSchema>;

export const optionsResponseSchema = z.object({ items: z.array(optionSchema) });
export type OptionsResponse = z.infer<typeof optionsResponseSchema>;
