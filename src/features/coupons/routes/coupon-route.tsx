import type { QueryClient } from '@tanstack/react-query';
import { CouponScreen } from '../components/coupon-screen';
import { idParam, type PrefetchArgs } from '../../../lib/routing';
import { couponQuery } from '../api/coupons-queries';

export const Component = CouponScreen;

export function prefetch(qc: QueryClient, { params }: PrefetchArgs): void {
  const id = idParam(params);
  if (id) void qc.prefetchQuery(couponQuery(id));
}
