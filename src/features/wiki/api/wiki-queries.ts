import { keepPreviousData, queryOptions } from '@tanstack/react-query';
import { api, queryString } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/queries/keys';
import { wikiIndexSchema, wikiListSchema, wikiPageResponseSchema, type WikiQuery } from '../../../../shared/schemas/wiki';

const root = queryKeys.wiki.all;

export const wikiListQuery = (q: Partial<WikiQuery>) =>
  queryOptions({
    queryKey: [...root, 'list', q] as const,
    queryFn: () => api.get(`/wiki${queryString(q)}`, wikiListSchema),
    placeholderData: keepPreviousData,
  });

export const wikiIndexQuery = () =>
  queryOptions({
    queryKey: [...root, 'index'] as const,
    queryFn: () => api.get('/wiki/index', wikiIndexSchema),
  });

export const wikiPageQuery = (slug: string) =>
  queryOptions({
    queryKey: [...root, 'page', slug] as const,
    queryFn: async () => (await api.get(`/wiki/${encodeURIComponent(slug)}`, wikiPageResponseSchema)).page,
  });

/** The export is a file download the browser makes itself (a plain link), not a fetch. */
export const wikiExportHref = (slug: string) => `/api/wiki/${encodeURIComponent(slug)}/export`;
