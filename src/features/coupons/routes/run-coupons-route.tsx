import type { QueryClient } from '@tanstack/react-query';
import { RunCouponsScreen } from '../components/coupons-screens';
import { idParam, type PrefetchArgs } from '../../../lib/routing';
import { gridCouponsQuery } from '../api/coupons-queries';

export const Component = RunCouponsScreen;

export function prefetch(qc: QueryClient, { params }: PrefetchArgs): void {
  const runId = idParam(params);
  if (runId) void qc.prefetchQuery(gridCouponsQuery({ runId }));
}
