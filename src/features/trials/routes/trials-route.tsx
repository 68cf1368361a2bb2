import type { QueryClient } from '@tanstack/react-query';
import { TrialsScreen } from '../components/trials-screen';
import { trialListQuery } from '../../../lib/queries/records';

export const Component = TrialsScreen;

export function prefetch(qc: QueryClient): void {
  void qc.prefetchQuery(trialListQuery({ page: 1, pageSize: 25 }));
}
