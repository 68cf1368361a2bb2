import { describe, expect, it } from 'vitest';
import type { StageTimes } from './stages';
import {
  lotResinWarnings,
  mixedConditionsWarning,
  vacuumStartWarning,
  weighingStageProblem,
  weighingWarnings,
  type CouponPlan,
  type RunOfCoupon,
  type WeighingEntry,
} from './contradictions';

// These are the trade's order of work (dry → vacuum → soak → cure → weigh), common practice, no published source.
const amber = { id: 1, name: 'Amber resin' };
const clear = { id: 2, name: 'Clear resin' };

describe("a run's lot against the resin the trial planned", () => {
  const coupons: CouponPlan[] = [
    { id: 11, tag: 'T1-001', role: 'treated', plannedResin: amber },
    { id: 12, tag: 'T1-002', role: 'treated', plannedResin: clear },
    { id: 13, tag: 'T1-003', role: 'treated', plannedResin: clear },
    { id: 14, tag: 'T1-004', role: 'treated', plannedResin: null },
    { id: 15, tag: 'T1-C01', role: 'control', plannedResin: null },
  ];

  it('warns for the coupons planned with another resin, naming both resins and the tags', () => {
    const w = lotResinWarnings({ code: 'L-7', resin: amber }, coupons);
    expect(w).toHaveLength(1);
    expect(w[0]).toMatchObject({ code: 'lot-resin-differs', couponIds: [12, 13] });
    expect(w[0]?.message).toContain('Lot L-7 is Amber resin, but the trial planned Clear resin for 2 coupons in this run (T1-002, T1-003)');
  });

  it('one warning per planned resin that differs', () => {
    const third = { id: 3, name: 'Dark resin' };
    expect(lotResinWarnings({ code: 'L-9', resin: third }, coupons).map((w) => w.couponIds)).toEqual([[11], [12, 13]]);
  });

  it('is silent when the lot matches, when there is no lot, and for coupons without a plan', () => {
    expect(
      lotResinWarnings(
        { code: 'L-7', resin: amber },
        coupons.filter((c) => c.id !== 12 && c.id !== 13),
      ),
    ).toEqual([]);
    expect(lotResinWarnings(null, coupons)).toEqual([]);
  });
});

const at = (h: number) => new Date(Date.UTC(2026, 2, 1, h)).toISOString();
const run = (stages: StageTimes[]): RunOfCoupon => ({ code: 'R26-004', stages });
const drying = run([{ stage: 'drying', startedAt: at(0), endedAt: null }]);
const curing = run([
  { stage: 'vacuum', startedAt: at(1), endedAt: at(5) },
  { stage: 'soak', startedAt: at(5), endedAt: at(14) },
  { stage: 'cure', startedAt: at(15), endedAt: null },
]);
const cured = run([
  { stage: 'vacuum', startedAt: at(1), endedAt: at(5) },
  { stage: 'soak', startedAt: at(5), endedAt: at(14) },
  { stage: 'cure', startedAt: at(15), endedAt: at(18) },
]);

describe('a weighing against the stage its run has reached', () => {
  // [case, stage, measured at, run, expected fragment or null]
  const rows: [string, Parameters<typeof weighingStageProblem>[0], string, RunOfCoupon, string | null][] = [
    ['cured while the run is still drying', 'cured', at(3), drying, 'run R26-004 is still at its drying stage: no cure is recorded yet'],
    ['cured while the cure is open', 'cured', at(16), curing, 'run R26-004 is still curing'],
    ['cured dated before the cure ended', 'cured', at(17), cured, "dated before run R26-004's cure ended"],
    ['cured after the cure ended', 'cured', at(19), cured, null],
    ['wet-test before any cure', 'wet-test', at(3), drying, 'no cure is recorded yet'],
    ['soaked while drying', 'soaked', at(3), drying, 'no soak is recorded yet'],
    ['soaked dated before the soak', 'soaked', at(4), cured, "dated before run R26-004's soak started"],
    ['soaked during the soak', 'soaked', at(6), cured, null],
    ['dry while drying', 'dry', at(3), drying, null],
    ['dry after the vacuum started', 'dry', at(2), cured, 'would include resin'],
    ['dry before the vacuum started', 'dry', at(0), cured, null],
    ['drying check after the vacuum', 'drying-check', at(6), cured, 'would include resin'],
  ];
  it.each(rows)('%s', (_case, stage, when, r, fragment) => {
    const problem = weighingStageProblem(stage, when, r);
    if (fragment === null) expect(problem).toBeNull();
    else expect(problem).toContain(fragment);
  });

  it('groups a grid save into one warning per run, stage and reason, naming the coupons', () => {
    const entry = (couponId: number, stage: WeighingEntry['stage'], r: RunOfCoupon | null, role: WeighingEntry['role'] = 'treated'): WeighingEntry => ({
      couponId,
      tag: `T1-${String(couponId).padStart(3, '0')}`,
      role,
      stage,
      measuredAt: at(3),
      run: r,
    });
    const w = weighingWarnings([
      entry(1, 'cured', drying),
      entry(2, 'cured', drying),
      entry(3, 'dry', drying),
      entry(4, 'cured', null),
      entry(5, 'dry', null),
      entry(6, 'cured', drying, 'control'),
    ]);
    expect(w.map((x) => [x.code, x.couponIds])).toEqual([
      ['weighing-ahead-of-run', [1, 2]],
      ['weighing-without-run', [4]],
    ]);
    expect(w[0]?.message).toMatch(/^2 cured weights \(T1-001, T1-002\): run R26-004 is still at its drying stage/);
  });
});

describe('starting the vacuum', () => {
  it('warns about treated coupons without a dry weight and says why it matters', () => {
    const w = vacuumStartWarning([
      { id: 1, tag: 'A', role: 'treated', hasDryWeighing: true },
      { id: 2, tag: 'B', role: 'treated', hasDryWeighing: false },
      { id: 3, tag: 'C', role: 'control', hasDryWeighing: false },
    ]);
    expect(w).toMatchObject({ code: 'vacuum-without-dry-weight', couponIds: [2] });
    expect(w?.message).toContain('1 coupon has no dry weight yet (B)');
    expect(w?.message).toContain('uptake can never be worked out');
  });

  it('lists at most five tags', () => {
    const many = Array.from({ length: 8 }, (_, i) => ({ id: i, tag: `X${i}`, role: 'treated' as const, hasDryWeighing: false }));
    expect(vacuumStartWarning(many)?.message).toContain('(X0, X1, X2, X3, X4 and 3 more)');
  });

  it('is silent when every coupon is weighed dry', () => {
    expect(vacuumStartWarning([{ id: 1, tag: 'A', role: 'treated', hasDryWeighing: true }])).toBeNull();
    expect(vacuumStartWarning([])).toBeNull();
  });
});

describe('coupons of several trial conditions picked for one run', () => {
  // One chamber cycle has one vacuum, soak and cure (common practice), so a run serves one condition.
  const short = { id: 21, label: 'Maple · Amber resin · 2 h soak' };
  const long = { id: 22, label: 'Maple · Amber resin · overnight soak' };

  it('names each condition with its coupons', () => {
    const w = mixedConditionsWarning([
      { id: 1, tag: 'T1-001', role: 'treated', condition: short },
      { id: 2, tag: 'T1-002', role: 'treated', condition: long },
      { id: 3, tag: 'T1-003', role: 'treated', condition: long },
    ]);
    expect(w).toMatchObject({ code: 'conditions-mixed', couponIds: [1, 2, 3] });
    expect(w?.message).toContain(
      '2 different trial conditions: Maple · Amber resin · 2 h soak (1: T1-001); Maple · Amber resin · overnight soak (2: T1-002, T1-003)',
    );
  });

  it('is silent for one condition, for coupons without a plan beside it, and for controls', () => {
    expect(
      mixedConditionsWarning([
        { id: 1, tag: 'A', role: 'treated', condition: short },
        { id: 2, tag: 'B', role: 'treated', condition: short },
        { id: 3, tag: 'C', role: 'treated', condition: null },
        { id: 4, tag: 'K', role: 'control', condition: long },
      ]),
    ).toBeNull();
    expect(mixedConditionsWarning([])).toBeNull();
  });
});
