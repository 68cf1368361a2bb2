import { z } from 'zod';
import { evidenceSchema, signatureSchema } from './findings';
import { listResponseSchema } from './common';

export const slugParamsSchema = z.strictObject({
  slug: z
    .string()
    .max(200)
    .regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, 'A page address is lower-case letters, digits and dashes'),
});

/** The index and the search share one query: with `q`, pages are ranked by FTS5 relevance. */
export const wikiQuerySchema = z.strictObject({
  q: z.string().trim().max(200, 'Search with at most 200 characters').optional(),
  speciesId: z.coerce.number().int().positive().optional(),
  resinId: z.coerce.number().int().positive().optional(),
  /** Superseded pages stay readable; the index leaves them out unless asked. */
  includeSuperseded: z.enum(['true', 'false']).optional(),
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
});
export type WikiQuery = z.infer<typeof wikiQuerySchema>;

const named = z.object({ id: z.number().int(), name: z.string() });

/** A search excerpt as pieces, `match` marking the words that matched; the client draws the marks itself, so no HTML crosses. */
export const snippetSchema = z.array(z.object({ text: z.string(), match: z.boolean() }));

export const wikiListItemSchema = z.object({
  slug: z.string(),
  title: z.string(),
  version: z.number().int(),
  species: z.array(named),
  resins: z.array(named),
  approvedAt: z.string(),
  signerName: z.string(),
  superseded: z.boolean(),
  snippet: snippetSchema.nullable(),
});
export type WikiListItem = z.infer<typeof wikiListItemSchema>;
export const wikiListSchema = listResponseSchema(wikiListItemSchema);
export type WikiList = z.infer<typeof wikiListSchema>;

/** Pages grouped for the index: every species and every resin that has at least one current page. */
export const wikiIndexSchema = z.object({
  bySpecies: z.array(z.object({ species: named, pages: z.array(z.object({ slug: z.string(), title: z.string() })) })),
  byResin: z.array(z.object({ resin: named, pages: z.array(z.object({ slug: z.string(), title: z.string() })) })),
});
export type WikiIndex = z.infer<typeof wikiIndexSchema>;

export const wikiPageSchema = z.object({
  slug: z.string(),
  findingId: z.number().int(),
  seriesId: z.number().int(),
  version: z.number().int(),
  title: z.string(),
  bodyMd: z.string(),
  /** Sanitised HTML, rendered once at approval and frozen with the page. */
  bodyHtml: z.string(),
  species: z.array(named),
  resins: z.array(named),
  trials: z.array(z.object({ id: z.number().int(), code: z.string(), title: z.string() })),
  author: z.object({ id: z.number().int(), name: z.string() }),
  evidence: z.array(evidenceSchema),
  signature: signatureSchema,
  approvedAt: z.string(),
  /** Set when a later approved version replaces this page; the page stays readable. */
  supersededBy: z.object({ slug: z.string(), title: z.string(), version: z.number().int() }).nullable(),
  supersedes: z.object({ slug: z.string(), title: z.string(), version: z.number().int() }).nullable(),
});
export type WikiPage = z.infer<typeof wikiPageSchema>;
export const wikiPageResponseSchema = z.object({ page: wikiPageSchema });
