import type { QueryClient } from '@tanstack/react-query';
import { TrialPlanScreen } from '../components/trial-plan-screen';
import { resinListQuery, speciesListQuery } from '../../../lib/queries/reference';

export const Component = TrialPlanScreen;

export function prefetch(qc: QueryClient): void {
  void qc.prefetchQuery(speciesListQuery());
  void qc.prefetchQuery(resinListQuery());
}
