import type { QueryClient } from '@tanstack/react-query';
import { ReferenceScreen } from '../components/reference-screen';
import type { PrefetchArgs } from '../../../lib/routing';
import { lotListQuery, resinListQuery, speciesListQuery } from '../../../lib/queries/reference';

export const Component = ReferenceScreen;

export function prefetch(qc: QueryClient, { url }: PrefetchArgs): void {
  const tab = url.searchParams.get('tab');
  if (tab === 'resins') void qc.prefetchQuery(resinListQuery());
  else if (tab === 'lots') void qc.prefetchQuery(lotListQuery());
  else void qc.prefetchQuery(speciesListQuery());
}
