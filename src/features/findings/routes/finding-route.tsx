import type { QueryClient } from '@tanstack/react-query';
import { FindingScreen } from '../components/finding-screen';
import { findingQuery } from '../api/findings-queries';
import { idParam, type PrefetchArgs } from '../../../lib/routing';

export const Component = FindingScreen;

export function prefetch(qc: QueryClient, { params }: PrefetchArgs): void {
  const id = idParam(params);
  if (id) void qc.prefetchQuery(findingQuery(id));
}
