import type { QueryClient } from '@tanstack/react-query';
import { CouponsScreen } from '../components/coupons-screens';
import type { PrefetchArgs } from '../../../lib/routing';
import { couponListQuery } from '../../../lib/queries/records';
import { runOptionsQuery, trialOptionsQuery } from '../../../lib/queries/options';
import { gridCouponsQuery } from '../api/coupons-queries';

export const Component = CouponsScreen;

export function prefetch(qc: QueryClient, { url }: PrefetchArgs): void {
  void qc.prefetchQuery(trialOptionsQuery());
  void qc.prefetchQuery(runOptionsQuery());
  const trialId = Number(url.searchParams.get('trialId')) || null;
  const runId = Number(url.searchParams.get('runId')) || null;
  if (trialId) void qc.prefetchQuery(gridCouponsQuery({ trialId }));
  else if (runId) void qc.prefetchQuery(gridCouponsQuery({ runId }));
  else void qc.prefetchQuery(couponListQuery({ page: 1, pageSize: 50, sort: 'tag' }));
}
