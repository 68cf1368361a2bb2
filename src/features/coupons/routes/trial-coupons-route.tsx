import type { QueryClient } from '@tanstack/react-query';
import { TrialCouponsScreen } from '../components/coupons-screens';
import { idParam, type PrefetchArgs } from '../../../lib/routing';
import { trialQuery } from '../../../lib/queries/records';
import { gridCouponsQuery } from '../api/coupons-queries';

export const Component = TrialCouponsScreen;

export function prefetch(qc: QueryClient, { params }: PrefetchArgs): void {
  const trialId = idParam(params);
  if (!trialId) return;
  void qc.prefetchQuery(gridCouponsQuery({ trialId }));
  void qc.prefetchQuery(trialQuery(trialId));
}
