import type { QueryClient } from '@tanstack/react-query';
import { WikiPageScreen } from '../components/wiki-page-screen';
import { wikiPageQuery } from '../api/wiki-queries';
import type { PrefetchArgs } from '../../../lib/routing';

export const Component = WikiPageScreen;

export function prefetch(qc: QueryClient, { params }: PrefetchArgs): void {
  if (params.slug) void qc.prefetchQuery(wikiPageQuery(params.slug));
}
