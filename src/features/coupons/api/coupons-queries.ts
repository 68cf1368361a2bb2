import { queryOptions } from '@tanstack/react-query';
import { api, queryString } from '../../../lib/api-client';
import { couponHistorySchema, couponListSchema, couponResponseSchema, type CouponListQuery, type CouponOut } from '../../../../shared/schemas/coupons';
import { speciesListSchema } from '../../../../shared/schemas/reference';
import { trialListSchema } from '../../../../shared/schemas/trials';
import { runListSchema } from '../../../../shared/schemas/runs';

export type GridScope = { runId: number } | { trialId: number };

export const couponKeys = {
  all: ['coupons'] as const,
  list: (q: Partial<CouponListQuery>) => [...couponKeys.all, 'list', q] as const,
  /** Every coupon of a run or a trial, for the entry grid. */
  grid: (scope: GridScope) => [...couponKeys.all, 'grid', scope] as const,
  detail: (id: number) => [...couponKeys.all, 'detail', id] as const,
  history: (id: number) => [...couponKeys.all, 'history', id] as const,
  // Reference lists the coupon screens read; kept under this feature's root.
  species: () => [...couponKeys.all, 'picker', 'species'] as const,
  trials: () => [...couponKeys.all, 'picker', 'trials'] as const,
  runs: () => [...couponKeys.all, 'picker', 'runs'] as const,
};

export const couponsQuery = (q: Partial<CouponListQuery>) =>
  queryOptions({
    queryKey: couponKeys.list(q),
    queryFn: () => api.get(`/coupons${queryString({ ...q, pageSize: q.pageSize ?? 50 })}`, couponListSchema),
  });

const GRID_PAGE = 200;

/** All coupons of the scope, page by page (a run holds up to 500), ordered by tag. */
export const gridCouponsQuery = (scope: GridScope) =>
  queryOptions({
    queryKey: couponKeys.grid(scope),
    queryFn: async () => {
      const items: CouponOut[] = [];
      for (let page = 1; ; page++) {
        const res = await api.get(`/coupons${queryString({ ...scope, page, pageSize: GRID_PAGE, sort: 'tag' })}`, couponListSchema);
        items.push(...res.items);
        if (items.length >= res.total || res.items.length === 0) break;
      }
      return items;
    },
  });

export const couponQuery = (id: number) =>
  queryOptions({
    queryKey: couponKeys.detail(id),
    queryFn: async () => (await api.get(`/coupons/${id}`, couponResponseSchema)).coupon,
  });

export const couponHistoryQuery = (id: number) =>
  queryOptions({
    queryKey: couponKeys.history(id),
    queryFn: () => api.get(`/coupons/${id}/history`, couponHistorySchema),
  });

export const speciesPickerQuery = () =>
  queryOptions({
    queryKey: couponKeys.species(),
    queryFn: () => api.get(`/species${queryString({ pageSize: 200, sort: 'commonName' })}`, speciesListSchema),
    staleTime: 300_000,
  });

export const trialsPickerQuery = () =>
  queryOptions({
    queryKey: couponKeys.trials(),
    queryFn: () => api.get(`/trials${queryString({ pageSize: 200, sort: '-createdAt' })}`, trialListSchema),
    staleTime: 60_000,
  });

export const runsPickerQuery = () =>
  queryOptions({
    queryKey: couponKeys.runs(),
    queryFn: () => api.get(`/runs${queryString({ pageSize: 200 })}`, runListSchema),
    staleTime: 60_000,
  });
