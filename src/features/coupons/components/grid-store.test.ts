import { describe, expect, it, vi } from 'vitest';
import { GridStore } from './grid-store';
import { converter, testCoupon } from './grid-test-coupon';

const metric = converter('metric');
const coupons = () => [testCoupon({ id: 1, tag: 'A' }), testCoupon({ id: 2, tag: 'B' }), testCoupon({ id: 3, tag: 'C' })];

describe('GridStore', () => {
  it('tells only the row that was typed in, and keeps the other rows’ snapshots', () => {
    const list = coupons();
    const store = new GridStore(list, metric);
    const before = list.map((c) => store.row(c));
    const one = vi.fn();
    const two = vi.fn();
    const any = vi.fn();
    store.subscribeRow(1, one);
    store.subscribeRow(2, two);
    store.subscribe(any);
    store.setDraft(1, 'dry', '20');
    expect(one).toHaveBeenCalledTimes(1);
    expect(two).not.toHaveBeenCalled();
    expect(any).toHaveBeenCalledTimes(1);
    expect(store.row(list[1]!)).toBe(before[1]);
    const after = store.row(list[0]!);
    expect(after).not.toBe(before[0]);
    expect(after.model.typed).toEqual({ dry: 20 });
    // The same value again changes nothing.
    store.setDraft(1, 'dry', '20');
    expect(one).toHaveBeenCalledTimes(1);
    expect(store.row(list[0]!)).toBe(after);
  });

  it('gives a fresh row when its coupon is replaced (after a save) and when the units change', () => {
    const list = coupons();
    const store = new GridStore(list, metric);
    const a = store.row(list[0]!);
    const replaced = { ...list[0]!, version: 2 };
    expect(store.row(replaced)).not.toBe(a);
    const b = store.row(list[1]!);
    store.setUnits(converter('us'));
    expect(store.row(list[1]!)).not.toBe(b);
  });

  it('counts typed rows and lists the problems in grid order', () => {
    const store = new GridStore(coupons(), metric);
    expect(store.summary()).toEqual({ pending: 0, problems: [] });
    store.setDraft(3, 'cured', 'x');
    store.setDraft(1, 'dry', '20');
    const s = store.summary();
    expect(s.pending).toBe(2);
    expect(s.problems).toEqual([{ key: '3-cured', text: 'C, cured mass: “x” is not a number', r: 2, c: 5 }]);
    expect(store.summary()).toBe(s);
    store.clearDraft(3, 'cured');
    expect(store.summary().pending).toBe(1);
    expect(store.drafts()).toEqual({ 1: { dry: '20' } });
  });

  it('replaces all drafts at once and tells only the rows that changed', () => {
    const store = new GridStore(coupons(), metric);
    store.setDraft(1, 'dry', '20');
    const kept = store.drafts()[1];
    const one = vi.fn();
    const two = vi.fn();
    store.subscribeRow(1, one);
    store.subscribeRow(2, two);
    store.setDrafts((d) => ({ ...d, 2: { dry: '21' } }));
    expect(store.drafts()[1]).toBe(kept);
    expect(one).not.toHaveBeenCalled();
    expect(two).toHaveBeenCalledTimes(1);
  });

  it('keeps the refusals of a save on their rows until the cell is typed again', () => {
    const list = coupons();
    const store = new GridStore(list, metric);
    store.setRefusals({ 2: { dry: 'already weighed' } }, { 3: 'coupon moved' });
    expect(store.row(list[1]!).errors).toEqual({ dry: 'already weighed' });
    expect(store.row(list[2]!).rowError).toBe('coupon moved');
    expect(store.summary().problems.map((p) => p.text)).toEqual(['B, dry mass: already weighed', 'C: coupon moved']);
    store.setDraft(2, 'dry', '22');
    expect(store.row(list[1]!).errors).toEqual({});
  });

  it('moves the active cell and tells the rows it leaves and enters', () => {
    const store = new GridStore(coupons(), metric, { r: 1, c: 2 });
    expect(store.activeColumnIn(1)).toBe(2);
    expect(store.activeColumnIn(0)).toBe(-1);
    const l = vi.fn();
    store.subscribeActive(l);
    store.setActive(0, 4);
    store.setActive(0, 4);
    expect(l).toHaveBeenCalledTimes(1);
    expect(store.activeColumnIn(0)).toBe(4);
    expect(store.indexOf(3)).toBe(2);
    expect(store.indexOf(99)).toBe(-1);
  });
});
