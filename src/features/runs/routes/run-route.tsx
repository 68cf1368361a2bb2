import type { QueryClient } from '@tanstack/react-query';
import { RunScreen } from '../components/run-screen';
import { runQuery } from '../../../lib/queries/records';
import { idParam, type PrefetchArgs } from '../../../lib/routing';

export const Component = RunScreen;

export function prefetch(qc: QueryClient, { params }: PrefetchArgs): void {
  const id = idParam(params);
  if (id) void qc.prefetchQuery(runQuery(id));
}
