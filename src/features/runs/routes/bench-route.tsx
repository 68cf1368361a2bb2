import type { QueryClient } from '@tanstack/react-query';
import { BenchScreen } from '../components/bench-screen';
import { benchQuery, runsInProgressQuery } from '../api/runs-queries';

export const Component = BenchScreen;

export function prefetch(qc: QueryClient): void {
  void qc.prefetchQuery(benchQuery());
  void qc.prefetchQuery(runsInProgressQuery());
}
