import type { QueryClient } from '@tanstack/react-query';
import { FindingsScreen } from '../components/findings-screen';
import { findingListQuery } from '../api/findings-queries';

export const Component = FindingsScreen;

export function prefetch(qc: QueryClient): void {
  void qc.prefetchQuery(findingListQuery({}));
}
