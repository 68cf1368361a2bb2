import type { QueryClient } from '@tanstack/react-query';
import type { PrefetchArgs } from '../../../lib/routing';
import { RunsScreen, runFiltersOf } from '../components/runs-screen';
import { runListQuery } from '../../../lib/queries/records';

export const Component = RunsScreen;

export function prefetch(qc: QueryClient, { url }: PrefetchArgs): void {
  const page = Math.max(1, Math.floor(Number(url.searchParams.get('page'))) || 1);
  void qc.prefetchQuery(runListQuery({ ...runFiltersOf((k) => url.searchParams.get(k) ?? ''), page, pageSize: 50 }));
}
