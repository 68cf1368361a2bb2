import type { QueryClient } from '@tanstack/react-query';
import { NewRunScreen } from '../components/new-run-screen';
import { lotListQuery } from '../../../lib/queries/reference';
import { trialListQuery } from '../../../lib/queries/records';

export const Component = NewRunScreen;

export function prefetch(qc: QueryClient): void {
  void qc.prefetchQuery(lotListQuery());
  void qc.prefetchQuery(trialListQuery());
}
