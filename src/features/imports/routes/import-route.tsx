import type { QueryClient } from '@tanstack/react-query';
import { idParam, type PrefetchArgs } from '../../../lib/routing';
import { importQuery } from '../api/imports-queries';
import { ImportScreen } from '../components/import-screen';

export const Component = ImportScreen;
export function prefetch(qc: QueryClient, { params }: PrefetchArgs) {
  const id = idParam(params);
  if (id !== null) void qc.prefetchQuery(importQuery(id));
}
