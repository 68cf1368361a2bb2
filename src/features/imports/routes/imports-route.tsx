import type { QueryClient } from '@tanstack/react-query';
import { importListQuery } from '../api/imports-queries';
import { ImportsScreen } from '../components/imports-screen';

export const Component = ImportsScreen;
export function prefetch(qc: QueryClient) {
  void qc.prefetchQuery(importListQuery(1));
}
