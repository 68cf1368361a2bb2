import { describe, expect, it } from 'vitest';
import { affects, queryKeys, rootsFor } from './keys';

describe('query key registry', () => {
  it('keeps every key of a resource under its root, so invalidating the root reaches it', () => {
    expect(queryKeys.coupons.grid({ runId: 4 }).slice(0, 1)).toEqual(queryKeys.coupons.all);
    expect(queryKeys.trials.labels(2).slice(0, 3)).toEqual(queryKeys.trials.detail(2));
    expect(queryKeys.bench.due(4).slice(0, 1)).toEqual(queryKeys.bench.all);
  });

  it('refreshes run and trial progress, the bench and analyses when measurements change', () => {
    const roots = rootsFor(['measurements']).map((r) => r[0]);
    expect(roots).toEqual(expect.arrayContaining(['coupons', 'runs', 'trials', 'bench', 'analysis']));
  });

  it('names each root once when several changes touch it', () => {
    const roots = rootsFor(['measurements', 'runs', 'coupons']).map((r) => r[0]);
    expect(new Set(roots).size).toBe(roots.length);
  });

  it('lists only registered roots in what a change affects', () => {
    const registered = new Set(Object.values(queryKeys).map((k) => k.all[0]));
    for (const roots of Object.values(affects)) for (const r of roots) expect(registered).toContain(r[0]);
  });
});
