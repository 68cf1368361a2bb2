import type { QueryClient } from '@tanstack/react-query';
import { OutboxScreen } from '../components/outbox-screen';
import { outboxQuery } from '../api/admin-queries';

export const Component = OutboxScreen;

export function prefetch(qc: QueryClient): void {
  void qc.prefetchQuery(outboxQuery(1));
}
