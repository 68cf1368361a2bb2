import { keepPreviousData, queryOptions } from '@tanstack/react-query';
import { api, queryString } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/queries/keys';
import {
  attachableViewListSchema,
  findingListSchema,
  findingResponseSchema,
  revisionListSchema,
  revisionResponseSchema,
  type FindingListQuery,
} from '../../../../shared/schemas/findings';

const root = queryKeys.findings.all;
export const findingKeys = {
  list: (q: Partial<FindingListQuery>) => [...root, 'list', q] as const,
  detail: (id: number) => [...root, 'detail', id] as const,
  revisions: (id: number) => [...root, 'detail', id, 'revisions'] as const,
  revision: (id: number, n: number) => [...root, 'detail', id, 'revisions', n] as const,
  attachable: () => [...root, 'attachable-views'] as const,
};

export const findingListQuery = (q: Partial<FindingListQuery> = {}) =>
  queryOptions({
    queryKey: findingKeys.list(q),
    queryFn: () => api.get(`/findings${queryString({ pageSize: 50, ...q })}`, findingListSchema),
    placeholderData: keepPreviousData,
  });

export const findingQuery = (id: number) =>
  queryOptions({
    queryKey: findingKeys.detail(id),
    queryFn: async () => (await api.get(`/findings/${id}`, findingResponseSchema)).finding,
  });

export const revisionsQuery = (id: number) =>
  queryOptions({
    queryKey: findingKeys.revisions(id),
    queryFn: () => api.get(`/findings/${id}/revisions`, revisionListSchema),
  });

export const revisionQuery = (id: number, n: number) =>
  queryOptions({
    queryKey: findingKeys.revision(id, n),
    queryFn: async () => (await api.get(`/findings/${id}/revisions/${n}`, revisionResponseSchema)).revision,
    staleTime: Infinity,
  });

/** Saved views of Compare that a finding may attach (the analysis feature's saved views, as findings read them). */
export const attachableViewsQuery = () =>
  queryOptions({
    queryKey: findingKeys.attachable(),
    queryFn: () => api.get('/findings/attachable-views', attachableViewListSchema),
  });
