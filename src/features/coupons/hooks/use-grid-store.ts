import { useCallback, useSyncExternalStore } from 'react';
import type { CouponOut } from '../../../../shared/schemas/coupons';
import type { Drafts } from '../components/grid-model';
import type { GridStore, GridSummary, RowState } from '../components/grid-store';

/** One row's state: the row re-renders when its own drafts or refusals change, not when another row's do. */
export function useRowState(store: GridStore, coupon: CouponOut): RowState {
  const subscribe = useCallback((l: () => void) => store.subscribeRow(coupon.id, l), [store, coupon.id]);
  return useSyncExternalStore(subscribe, () => store.row(coupon));
}

/** The active column in row `r`, or -1: only the rows the active cell leaves and enters re-render. */
export function useActiveColumn(store: GridStore, r: number): number {
  const subscribe = useCallback((l: () => void) => store.subscribeActive(l), [store]);
  return useSyncExternalStore(subscribe, () => store.activeColumnIn(r));
}

export function useGridSummary(store: GridStore): GridSummary {
  const subscribe = useCallback((l: () => void) => store.subscribe(l), [store]);
  return useSyncExternalStore(subscribe, () => store.summary());
}

export function useGridDrafts(store: GridStore): Drafts {
  const subscribe = useCallback((l: () => void) => store.subscribe(l), [store]);
  return useSyncExternalStore(subscribe, () => store.drafts());
}
