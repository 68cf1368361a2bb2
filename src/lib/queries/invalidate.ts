import { useQueryClient, type QueryClient } from '@tanstack/react-query';
import { useCallback } from 'react';
import { rootsFor, type Change } from './keys';

/** Refreshes every cached read that the named changes touch (see `affects` in keys.ts). */
export function invalidate(qc: QueryClient, ...changes: Change[]): Promise<void> {
  return Promise.all(rootsFor(changes).map((queryKey) => qc.invalidateQueries({ queryKey }))).then(() => undefined);
}

/** `const invalidate = useInvalidate(); … onSuccess: () => invalidate('measurements')` */
export function useInvalidate(): (...changes: Change[]) => Promise<void> {
  const qc = useQueryClient();
  return useCallback((...changes: Change[]) => invalidate(qc, ...changes), [qc]);
}
