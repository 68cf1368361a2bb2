import { queryOptions } from '@tanstack/react-query';
import { api, queryString } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/queries/keys';
import { couponHistorySchema, couponListSchema, couponResponseSchema, type CouponOut } from '../../../../shared/schemas/coupons';

export type GridScope = { runId: number } | { trialId: number };

// Lists of coupons are read through src/lib/queries/records.ts (other features show them too).

const GRID_PAGE = 200;

/** All coupons of the scope, page by page (a run holds up to 500), ordered by tag. */
export const gridCouponsQuery = (scope: GridScope) =>
  queryOptions({
    queryKey: queryKeys.coupons.grid(scope),
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
    queryKey: queryKeys.coupons.detail(id),
    queryFn: async () => (await api.get(`/coupons/${id}`, couponResponseSchema)).coupon,
  });

export const couponHistoryQuery = (id: number) =>
  queryOptions({
    queryKey: queryKeys.coupons.history(id),
    queryFn: () => api.get(`/coupons/${id}/history`, couponHistorySchema),
  });
