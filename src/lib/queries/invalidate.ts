import { useQueryClient, type QueryClient, type QueryKey } from '@tanstack/react-query';
import { useCallback } from 'react';
import { rootsFor, type Change } from './keys';

const startsWith = (key: QueryKey, prefix: QueryKey) => prefix.every((part, i) => JSON.stringify(key[i]) === JSON.stringify(part));

/**
 * Refreshes every cached read that the named changes touch (see `affects` in keys.ts). `keep`: keys the
 * caller has already brought up to date itself (e.g. the grid's rows from a save's answer), not refetched.
 */
export function invalidate(qc: QueryClient, changes: readonly Change[], keep: readonly QueryKey[] = []): Promise<void> {
  return Promise.all(
    rootsFor(changes).map((queryKey) => qc.invalidateQueries({ queryKey, predicate: (q) => !keep.some((k) => startsWith(q.queryKey, k)) })),
  ).then(() => undefined);
}

/** `const invalidate = useInvalidate(); … onSuccess: () => invalidate('measurements')` */
export function useInvalidate(): (...changes: Change[]) => Promise<void> {
  const qc = useQueryClient();
  return useCallback((...changes: Change[]) => invalidate(qc, changes), [qc]);
}
