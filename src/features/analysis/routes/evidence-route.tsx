import type { QueryClient } from '@tanstack/react-query';
import { idParam, type PrefetchArgs } from '../../../lib/routing';
import { evidenceQuery } from '../api/analysis-queries';
import { EvidenceScreen } from '../components/evidence-screen';

export const Component = EvidenceScreen;

export function prefetch(qc: QueryClient, { params }: PrefetchArgs): void {
  const id = idParam(params);
  if (id) void qc.prefetchQuery(evidenceQuery(id));
}
