import { queryOptions } from '@tanstack/react-query';
import { api, queryString } from '../../../lib/api-client';
import { benchResponseSchema, runListSchema, runResponseSchema, type RunListQuery } from '../../../../shared/schemas/runs';
import { resinLotListSchema } from '../../../../shared/schemas/reference';
import { trialListSchema } from '../../../../shared/schemas/trials';
import { couponListSchema } from '../../../../shared/schemas/coupons';

export const runKeys = {
  all: ['runs'] as const,
  list: (q: Partial<RunListQuery>) => [...runKeys.all, 'list', q] as const,
  detail: (id: number) => [...runKeys.all, 'detail', id] as const,
  bench: (withinHours: number) => [...runKeys.all, 'bench', withinHours] as const,
};

// Lists this feature reads to fill its pickers. Their own features own the screens; the keys sit under
// this feature's root so a run mutation never has to know another feature's cache layout.
export const pickerKeys = {
  lots: () => [...runKeys.all, 'picker', 'lots'] as const,
  trials: () => [...runKeys.all, 'picker', 'trials'] as const,
  trialCoupons: (trialId: number) => [...runKeys.all, 'picker', 'trial-coupons', trialId] as const,
};

export const runsQuery = (q: Partial<RunListQuery> = {}) =>
  queryOptions({
    queryKey: runKeys.list(q),
    queryFn: () => api.get(`/runs${queryString({ ...q, pageSize: q.pageSize ?? 100 })}`, runListSchema),
  });

export const runQuery = (id: number) =>
  queryOptions({
    queryKey: runKeys.detail(id),
    queryFn: async () => (await api.get(`/runs/${id}`, runResponseSchema)).run,
  });

/** What is due across all runs; refetched every minute so the timers stay honest while the page is open. */
export const benchQuery = (withinHours = 4) =>
  queryOptions({
    queryKey: runKeys.bench(withinHours),
    queryFn: () => api.get(`/bench${queryString({ withinHours })}`, benchResponseSchema),
    refetchInterval: 60_000,
  });

export const lotsPickerQuery = () =>
  queryOptions({
    queryKey: pickerKeys.lots(),
    queryFn: () => api.get(`/resin-lots${queryString({ pageSize: 200, sort: '-activatedAt' })}`, resinLotListSchema),
    staleTime: 60_000,
  });

export const trialsPickerQuery = () =>
  queryOptions({
    queryKey: pickerKeys.trials(),
    queryFn: () => api.get(`/trials${queryString({ pageSize: 200, sort: '-createdAt' })}`, trialListSchema),
    staleTime: 60_000,
  });

export const trialCouponsPickerQuery = (trialId: number) =>
  queryOptions({
    queryKey: pickerKeys.trialCoupons(trialId),
    queryFn: () => api.get(`/coupons${queryString({ trialId, pageSize: 200, sort: 'tag' })}`, couponListSchema),
  });
