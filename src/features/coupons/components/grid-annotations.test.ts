import { describe, expect, it } from 'vitest';
import { conditionTags, gridEntryWarnings, rowEntryWarnings } from './grid-annotations';
import { rowModel } from './grid-model';
import { converter, testCoupon } from './grid-test-coupon';

const NOW = '2026-03-01T10:00:00.000Z';
const metric = converter('metric');

const condition = (id: number, resinName: string, processLabel: string) =>
  ({ id, resinName, processLabel, label: `Test maple · ${resinName} · ${processLabel}` }) as Parameters<typeof conditionTags>[0][number]['conditions'][number];

describe('conditionTags', () => {
  it('codes the conditions C1, C2… in the trial’s order, with the resin and process as the name', () => {
    const tags = conditionTags([{ id: 1, code: 'T-1', conditions: [condition(11, 'Resin A', '4 h vacuum'), condition(12, 'Resin A', 'overnight soak')] }]);
    expect(tags.get(11)).toEqual({ code: 'C1', name: 'Resin A, 4 h vacuum', label: 'Test maple · Resin A · 4 h vacuum' });
    expect(tags.get(12)?.code).toBe('C2');
  });

  it('puts the trial code in front when a grid holds coupons of several trials', () => {
    const tags = conditionTags([
      { id: 1, code: 'T-1', conditions: [condition(11, 'Resin A', 'short')] },
      { id: 2, code: 'T-2', conditions: [condition(21, 'Resin B', 'long')] },
    ]);
    expect(tags.get(11)?.code).toBe('T-1 C1');
    expect(tags.get(21)?.code).toBe('T-2 C1');
  });
});

describe('rowEntryWarnings', () => {
  const drying = { code: 'R-9', stages: [{ stage: 'drying' as const, startedAt: '2026-02-28T08:00:00.000Z', endedAt: null }] };

  it('warns about a cured weight typed while the run is still drying, with the reason', () => {
    const model = rowModel(testCoupon({ tag: 'C-1' }), { dry: '20', cured: '25' }, metric, NOW);
    const [warning, ...more] = rowEntryWarnings(model, drying, NOW);
    expect(more).toEqual([]);
    expect(warning).toMatch(/^1 cured weight \(C-1\): run R-9 is still at its drying stage: no cure is recorded yet/);
  });

  it('says nothing about a dry weight, while the run is loading, or for a control', () => {
    expect(rowEntryWarnings(rowModel(testCoupon(), { dry: '20' }, metric, NOW), drying, NOW)).toEqual([]);
    expect(rowEntryWarnings(rowModel(testCoupon(), { cured: '25' }, metric, NOW), undefined, NOW)).toEqual([]);
    expect(rowEntryWarnings(rowModel(testCoupon({ role: 'control' }), { dry: '20' }, metric, NOW), drying, NOW)).toEqual([]);
  });

  it('warns about a soaked weight of a coupon in no run', () => {
    const [warning] = rowEntryWarnings(rowModel(testCoupon({ tag: 'C-2' }), { soaked: '25' }, metric, NOW), null, NOW);
    expect(warning).toMatch(/the coupon is in no run/);
  });
});

describe('gridEntryWarnings', () => {
  const drying = { code: 'R-9', stages: [{ stage: 'drying' as const, startedAt: '2026-02-28T08:00:00.000Z', endedAt: null }] };
  it('groups the cured weights typed while one run is drying into one message naming the coupons', () => {
    const models = [1, 2, 3].map((i) => rowModel(testCoupon({ id: 900 + i, tag: `G-${i}`, runId: 9 }), { dry: '20', cured: '25' }, metric, NOW));
    const loading = rowModel(testCoupon({ id: 950, tag: 'G-X', runId: 10 }), { cured: '25' }, metric, NOW);
    const warnings = gridEntryWarnings([...models, loading], (c) => (c.runId === 9 ? drying : undefined), NOW);
    expect(warnings).toHaveLength(1);
    expect(warnings[0]?.couponIds).toEqual([901, 902, 903]);
    expect(warnings[0]?.columnId).toBe('cured');
    expect(warnings[0]?.message).toMatch(/^3 cured weights \(G-1, G-2, G-3\): run R-9 is still at its drying stage/);
  });
});
