import type { QueryClient } from '@tanstack/react-query';
import { WikiScreen } from '../components/wiki-screen';
import { wikiIndexQuery, wikiListQuery } from '../api/wiki-queries';
import type { PrefetchArgs } from '../../../lib/routing';

export const Component = WikiScreen;

export function prefetch(qc: QueryClient, { url }: PrefetchArgs): void {
  void qc.prefetchQuery(wikiListQuery({ q: url.searchParams.get('q') || undefined }));
  void qc.prefetchQuery(wikiIndexQuery());
}
