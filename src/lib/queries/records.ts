import { keepPreviousData, queryOptions } from '@tanstack/react-query';
import { api, queryString } from '../api-client';
import { trialListSchema, trialResponseSchema, type TrialListQuery } from '../../../shared/schemas/trials';
import { runListSchema, runResponseSchema, type RunListQuery } from '../../../shared/schemas/runs';
import { couponListSchema, couponRowListSchema, type CouponListQuery } from '../../../shared/schemas/coupons';
import { queryKeys } from './keys';

// Reads of trials, runs and coupons that more than one feature shows (lists, pickers, one record).
// Writes stay in the owning feature; they refresh these through `useInvalidate`.

/** A page of trials, newest first. `trialListQuery()` is the picker: the latest 200. */
export const trialListQuery = (q: Partial<TrialListQuery> = { pageSize: 200 }) =>
  queryOptions({
    queryKey: queryKeys.trials.list(q),
    queryFn: () => api.get(`/trials${queryString({ sort: '-createdAt', ...q })}`, trialListSchema),
    placeholderData: keepPreviousData,
  });

export const trialQuery = (id: number) =>
  queryOptions({
    queryKey: queryKeys.trials.detail(id),
    queryFn: async () => (await api.get(`/trials/${id}`, trialResponseSchema)).trial,
  });

/** A page of runs, newest first. `runListQuery()` is the picker: the latest 200. */
export const runListQuery = (q: Partial<RunListQuery> = { pageSize: 200 }) =>
  queryOptions({
    queryKey: queryKeys.runs.list(q),
    queryFn: () => api.get(`/runs${queryString({ ...q, pageSize: q.pageSize ?? 100 })}`, runListSchema),
    placeholderData: keepPreviousData,
  });

export const runQuery = (id: number) =>
  queryOptions({
    queryKey: queryKeys.runs.detail(id),
    queryFn: async () => (await api.get(`/runs/${id}`, runResponseSchema)).run,
  });

/** A page of coupons as light rows: keys, current masses and the main metrics (from the results table). */
export const couponListQuery = (q: Partial<CouponListQuery>) =>
  queryOptions({
    queryKey: queryKeys.coupons.list(q),
    queryFn: () => api.get(`/coupons${queryString({ ...q, pageSize: q.pageSize ?? 50 })}`, couponRowListSchema),
    placeholderData: keepPreviousData,
  });

/** A page of coupons with their full answers (current readings, warnings, ASE): heavier, for screens that check readings. */
export const couponFullListQuery = (q: Partial<CouponListQuery>) =>
  queryOptions({
    queryKey: queryKeys.coupons.full(q),
    queryFn: () => api.get(`/coupons/full${queryString({ ...q, pageSize: q.pageSize ?? 50 })}`, couponListSchema),
    placeholderData: keepPreviousData,
  });

/** The coupons of one trial, by tag (a picker: up to 200). */
export const trialCouponsQuery = (trialId: number) => couponListQuery({ trialId, pageSize: 200, sort: 'tag' });
