import type { QueryClient } from '@tanstack/react-query';
import { TrialEditPlanScreen } from '../components/trial-plan-screen';
import { resinListQuery, speciesListQuery } from '../../../lib/queries/reference';
import { trialQuery } from '../../../lib/queries/records';
import { idParam, type PrefetchArgs } from '../../../lib/routing';

export const Component = TrialEditPlanScreen;

export function prefetch(qc: QueryClient, { params }: PrefetchArgs): void {
  const id = idParam(params);
  if (id) void qc.prefetchQuery(trialQuery(id));
  void qc.prefetchQuery(speciesListQuery());
  void qc.prefetchQuery(resinListQuery());
}
