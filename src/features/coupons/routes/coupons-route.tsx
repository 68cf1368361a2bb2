import type { QueryClient } from '@tanstack/react-query';
import { CouponsScreen, couponFiltersOf } from '../components/coupons-screens';
import type { PrefetchArgs } from '../../../lib/routing';
import { couponListQuery, trialQuery } from '../../../lib/queries/records';
import { runOptionsQuery, speciesOptionsQuery, trialOptionsQuery } from '../../../lib/queries/options';

export const Component = CouponsScreen;

export function prefetch(qc: QueryClient, { url }: PrefetchArgs): void {
  const s = url.searchParams;
  const getId = (k: string) => {
    const n = Number(s.get(k));
    return Number.isInteger(n) && n > 0 ? n : undefined;
  };
  const filters = couponFiltersOf((k) => s.get(k) ?? '', getId);
  const page = Math.max(1, Math.floor(Number(s.get('page'))) || 1);
  void qc.prefetchQuery(couponListQuery({ ...filters, page, pageSize: 50 }));
  void qc.prefetchQuery(trialOptionsQuery());
  void qc.prefetchQuery(runOptionsQuery());
  void qc.prefetchQuery(speciesOptionsQuery());
  if (filters.trialId) void qc.prefetchQuery(trialQuery(filters.trialId));
}
