import { useQueries } from '@tanstack/react-query';
import { useMemo, useRef } from 'react';
import type { RunOfCoupon } from '../../../../shared/runs/contradictions';
import type { CouponOut } from '../../../../shared/schemas/coupons';
import { runQuery, trialQuery } from '../../../lib/queries/records';
import { conditionTags, type ConditionTag } from '../components/grid-annotations';

const distinct = (ids: (number | null)[]) => [...new Set(ids.filter((x): x is number => x !== null))].sort((a, b) => a - b);

/**
 * What the grid shows beside the coupons' own readings: the condition each coupon belongs to (from its trial)
 * and where its run stands (to warn about a weighing the run's stages contradict). Read through the shared
 * trial and run queries, so they are the cache entries the trial and run pages use.
 */
export function useGridContext(coupons: readonly CouponOut[]): {
  conditions: Map<number, ConditionTag>;
  /** By run id; a run still loading is missing. */
  runs: Map<number, RunOfCoupon>;
} {
  const trialIds = useMemo(() => distinct(coupons.map((c) => c.trialId)), [coupons]);
  const runIds = useMemo(() => distinct(coupons.map((c) => c.runId)), [coupons]);
  const trials = useSame(useQueries({ queries: trialIds.map((id) => trialQuery(id)), combine: dataOf }));
  const runs = useSame(useQueries({ queries: runIds.map((id) => runQuery(id)), combine: dataOf }));
  const conditions = useMemo(() => conditionTags(trials.filter((t) => t !== undefined)), [trials]);
  const runMap = useMemo(() => new Map(runs.filter((r) => r !== undefined).map((r) => [r.id, { code: r.code, stages: r.stages }])), [runs]);
  return { conditions, runs: runMap };
}

const dataOf = <T>(results: { data: T | undefined }[]) => results.map((r) => r.data);

/** The previous array while its items are the same objects: the grid's rows then keep their props on a re-render. */
function useSame<T>(items: T[]): T[] {
  const ref = useRef(items);
  const prev = ref.current;
  if (prev !== items && (prev.length !== items.length || prev.some((x, i) => x !== items[i]))) ref.current = items;
  return ref.current;
}
