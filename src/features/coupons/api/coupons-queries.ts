import { queryOptions } from '@tanstack/react-query';
import { api, queryString } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/queries/keys';
import { couponHistorySchema, couponListSchema, couponResponseSchema } from '../../../../shared/schemas/coupons';

export type GridScope = { runId: number } | { trialId: number };

// Lists of coupons are read through src/lib/queries/records.ts (other features show them too).

const GRID_PAGE = 200;

/** All coupons of the scope (a run holds up to 500), ordered by tag: the first page says how many, the rest are fetched together. */
export const gridCouponsQuery = (scope: GridScope) =>
  queryOptions({
    queryKey: queryKeys.coupons.grid(scope),
    queryFn: async ({ signal }) => {
      const page = (n: number) => api.get(`/coupons/full${queryString({ ...scope, page: n, pageSize: GRID_PAGE, sort: 'tag' })}`, couponListSchema);
      const first = await page(1);
      const pages = Math.ceil(first.total / GRID_PAGE);
      const rest = await Promise.all(Array.from({ length: Math.max(0, pages - 1) }, (_, i) => page(i + 2)));
      signal.throwIfAborted();
      return [first, ...rest].flatMap((p) => p.items);
    },
  });

export const couponQuery = (id: number) =>
  queryOptions({
    queryKey: queryKeys.coupons.detail(id),
    queryFn: async () => (await api.get(`/coupons/${id}`, couponResponseSchema)).coupon,
  });

export const couponHistoryQuery = (id: number) =>
  queryOptions({
    queryKey: queryKeys.coupons.history(id),
    queryFn: () => api.get(`/coupons/${id}/history`, couponHistorySchema),
  });
