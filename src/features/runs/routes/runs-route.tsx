import type { QueryClient } from '@tanstack/react-query';
import { RunsScreen } from '../components/runs-screen';
import { runListQuery } from '../../../lib/queries/records';

export const Component = RunsScreen;

export function prefetch(qc: QueryClient): void {
  void qc.prefetchQuery(runListQuery({ page: 1, pageSize: 50 }));
}
