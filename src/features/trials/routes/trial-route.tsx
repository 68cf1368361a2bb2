import type { QueryClient } from '@tanstack/react-query';
import { TrialScreen } from '../components/trial-screen';
import { trialQuery } from '../../../lib/queries/records';
import { idParam, type PrefetchArgs } from '../../../lib/routing';

export const Component = TrialScreen;

export function prefetch(qc: QueryClient, { params }: PrefetchArgs): void {
  const id = idParam(params);
  if (id) void qc.prefetchQuery(trialQuery(id));
}
