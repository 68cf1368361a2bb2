import type { QueryClient } from '@tanstack/react-query';
import type { PrefetchArgs } from '../../../lib/routing';
import { TrialsScreen, trialFiltersOf } from '../components/trials-screen';
import { trialListQuery } from '../../../lib/queries/records';

export const Component = TrialsScreen;

export function prefetch(qc: QueryClient, { url }: PrefetchArgs): void {
  const page = Math.max(1, Math.floor(Number(url.searchParams.get('page'))) || 1);
  void qc.prefetchQuery(trialListQuery({ ...trialFiltersOf((k) => url.searchParams.get(k) ?? ''), page, pageSize: 25 }));
}
