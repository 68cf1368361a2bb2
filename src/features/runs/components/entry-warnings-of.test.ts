import { describe, expect, it } from 'vitest';
import type { CouponCondition } from '../../../../shared/schemas/coupons';
import { newRunWarnings } from './new-run-screen';
import { runContradictions, type RunCouponForWarnings, type RunForWarnings } from './run-screen';

// The screens' use of the shared rules (shared/runs/contradictions.ts, tested there): which facts of a lot,
// a run and its coupons they hand over. Order of work, common practice: dry → vacuum → soak → cure.
const clear = { id: 1, name: 'Clear test resin' };
const dyed = { id: 2, name: 'Dyed test resin' };
const shortSoak: CouponCondition = { id: 10, label: 'Maple · Dyed test resin · 2 h soak', processLabel: '2 h soak', plannedResin: dyed };
const longSoak: CouponCondition = { id: 11, label: 'Maple · Dyed test resin · overnight soak', processLabel: 'overnight soak', plannedResin: dyed };
const coupon = (id: number, condition: CouponCondition | null, weighings: RunCouponForWarnings['weighings'] = []): RunCouponForWarnings => ({
  id,
  tag: `T-${id}`,
  role: 'treated',
  condition,
  weighings,
});

describe('the new-run screen', () => {
  it('warns when the lot is another resin than the plan, and when conditions mix', () => {
    const w = newRunWarnings({ code: 'L-1', resinId: clear.id, resinName: clear.name }, [coupon(1, shortSoak), coupon(2, longSoak)]);
    expect(w.map((x) => x.code)).toEqual(['conditions-mixed', 'lot-resin-differs']);
    expect(w[1]?.message).toContain('Lot L-1 is Clear test resin, but the trial planned Dyed test resin for 2 coupons');
  });

  it('is silent for one condition and its planned resin, or before a lot is picked', () => {
    expect(newRunWarnings({ code: 'L-2', resinId: dyed.id, resinName: dyed.name }, [coupon(1, shortSoak), coupon(2, shortSoak)])).toEqual([]);
    expect(newRunWarnings(undefined, [coupon(1, shortSoak)])).toEqual([]);
  });
});

describe('the run page', () => {
  const at = (h: number) => new Date(Date.UTC(2026, 2, 1) + h * 3_600_000).toISOString();
  const run = (over: Partial<RunForWarnings> = {}): RunForWarnings => ({
    code: 'R-1',
    lot: { code: 'L-1', resin: dyed },
    stages: [{ stage: 'drying', startedAt: at(0), endedAt: null }],
    coupons: [
      { id: 1, tag: 'T-1', role: 'treated', stagesWeighed: ['cured'] },
      { id: 2, tag: 'T-2', role: 'treated', stagesWeighed: ['dry'] },
    ],
    ...over,
  });

  it('names a cured weight entered while the run dries, and the coupons still without a dry weight', () => {
    const w = runContradictions(run(), [
      coupon(1, shortSoak, [{ stage: 'cured', measuredAt: at(1) }]),
      coupon(2, shortSoak, [{ stage: 'dry', measuredAt: at(1) }]),
    ]);
    expect(w.map((x) => x.code)).toEqual(['weighing-ahead-of-run', 'vacuum-without-dry-weight']);
    expect(w[0]?.message).toContain('run R-1 is still at its drying stage');
    expect(w[1]?.couponIds).toEqual([1]);
  });

  it('stops asking for dry weights once the vacuum has started, and checks the lot against the plan', () => {
    const started = run({ lot: { code: 'L-9', resin: clear }, stages: [{ stage: 'vacuum', startedAt: at(0), endedAt: null }] });
    const w = runContradictions(started, [coupon(1, shortSoak), coupon(2, shortSoak)]);
    expect(w.map((x) => x.code)).toEqual(['lot-resin-differs']);
  });
});
