import { keepPreviousData, queryOptions } from '@tanstack/react-query';
import { api, queryString } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/queries/keys';
import { importDetailSchema, importListSchema, importProblemsSchema, type ImportDetail } from '../../../../shared/schemas/imports';

const root = queryKeys.imports.all;
export const importKeys = {
  list: (page: number) => [...root, 'list', page] as const,
  detail: (id: number) => [...root, 'detail', id] as const,
  problems: (id: number, page: number) => [...root, 'detail', id, 'problems', page] as const,
};

/** A job is running on the server: the import is polled until it is not. */
export const isBusy = (d: Pick<ImportDetail, 'status'> | undefined) => d?.status === 'previewing' || d?.status === 'committing' || d?.status === 'undoing';

/** The history, newest first. */
export const importListQuery = (page = 1) =>
  queryOptions({
    queryKey: importKeys.list(page),
    queryFn: () => api.get(`/imports${queryString({ page, pageSize: 25 })}`, importListSchema),
    placeholderData: keepPreviousData,
  });

/**
 * How long the server may hold a poll of a busy import: it answers when the job ends, so the screen shows
 * the outcome at once, and otherwise twice a second, so the progress bar moves.
 */
const BUSY_WAIT_MS = 500;

/**
 * One import; while its preview, commit or undo runs, asked again as soon as each answer comes (the
 * server holds each for up to BUSY_WAIT_MS; a refetch never overlaps one in flight).
 */
export const importQuery = (id: number) =>
  queryOptions({
    queryKey: importKeys.detail(id),
    queryFn: ({ client, queryKey }) =>
      api.get(`/imports/${id}${queryString({ wait: isBusy(client.getQueryData<ImportDetail>(queryKey)) ? BUSY_WAIT_MS : undefined })}`, importDetailSchema),
    refetchInterval: (q) => (isBusy(q.state.data) ? 50 : false),
  });

export const PROBLEMS_PAGE = 100;
export const importProblemsQuery = (id: number, page: number) =>
  queryOptions({
    queryKey: importKeys.problems(id, page),
    queryFn: () => api.get(`/imports/${id}/problems${queryString({ page, pageSize: PROBLEMS_PAGE })}`, importProblemsSchema),
    placeholderData: keepPreviousData,
  });
