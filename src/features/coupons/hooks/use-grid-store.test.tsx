// @vitest-environment jsdom
import { act, cleanup, render } from '@testing-library/react';
import { memo } from 'react';
import { afterEach, describe, expect, it } from 'vitest';
import type { CouponOut } from '../../../../shared/schemas/coupons';
import { GridStore } from '../components/grid-store';
import { converter, testCoupon } from '../components/grid-test-coupon';
import { useActiveColumn, useGridSummary, useRowState } from './use-grid-store';

afterEach(cleanup);

const renders = new Map<string, number>();
const count = (key: string) => renders.set(key, (renders.get(key) ?? 0) + 1);

const Row = memo(function Row({ store, coupon, r }: { store: GridStore; coupon: CouponOut; r: number }) {
  const state = useRowState(store, coupon);
  const active = useActiveColumn(store, r);
  count(coupon.tag);
  return (
    <p data-testid={coupon.tag}>
      {state.model.metrics.wpgPct ?? '—'} {active}
    </p>
  );
});

function Pending({ store }: { store: GridStore }) {
  count('pending');
  return <p data-testid="pending">{useGridSummary(store).pending}</p>;
}

function Grid({ store }: { store: GridStore }) {
  count('grid');
  return (
    <>
      <Pending store={store} />
      {store.coupons.map((c, r) => (
        <Row key={c.id} store={store} coupon={c} r={r} />
      ))}
    </>
  );
}

describe('the grid store in React', () => {
  it('re-renders only the row typed in (and the status), never the grid or the other rows', () => {
    renders.clear();
    const coupons = Array.from({ length: 50 }, (_, i) => testCoupon({ id: 500 + i, tag: `R${i}` }));
    const store = new GridStore(coupons, converter('metric'));
    const view = render(<Grid store={store} />);
    expect(renders.get('R7')).toBe(1);

    act(() => store.setDraft(507, 'dry', '20'));
    act(() => store.setDraft(507, 'cured', '25'));
    // WPG = (25 − 20) / 20 × 100 = 25 % (common practice), on the typed row.
    expect(view.getByTestId('R7').textContent).toBe('25 -1');
    expect(view.getByTestId('pending').textContent).toBe('1');
    expect(renders.get('R7')).toBe(3);
    expect(renders.get('R8')).toBe(1);
    expect(renders.get('grid')).toBe(1);
    expect(renders.get('pending')).toBe(3);

    // Moving the active cell re-renders the row it leaves and the row it enters.
    act(() => store.setActive(7, 5));
    act(() => store.setActive(8, 5));
    expect(renders.get('R7')).toBe(5);
    expect(renders.get('R8')).toBe(2);
    expect(renders.get('R9')).toBe(1);
  });
});
