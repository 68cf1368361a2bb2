import type { QueryClient } from '@tanstack/react-query';
import type { PrefetchArgs } from '../../../lib/routing';
import { filterChoicesQuery, overviewQuery } from '../api/analysis-queries';
import { CompareScreen, filtersFromSearch } from '../components/compare-screen';

export const Component = CompareScreen;

export function prefetch(qc: QueryClient, { url }: PrefetchArgs): void {
  const sgBasis = url.searchParams.get('sgBasis') === 'handbook' ? 'handbook' : 'measured';
  void qc.prefetchQuery(overviewQuery(filtersFromSearch(url.searchParams), sgBasis));
  void qc.prefetchQuery(filterChoicesQuery());
}
