import type { QueryClient } from '@tanstack/react-query';
import { LabelSheetScreen } from '../components/label-sheet-screen';
import { idParam, type PrefetchArgs } from '../../../lib/routing';
import { labelSheetQuery } from '../api/trials-queries';

export const Component = LabelSheetScreen;

export function prefetch(qc: QueryClient, { params }: PrefetchArgs): void {
  const id = idParam(params);
  if (id) void qc.prefetchQuery(labelSheetQuery(id));
}
