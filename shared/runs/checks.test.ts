import { describe, expect, it } from 'vitest';
import { runChecks, type RunCheckInput, type RunRule } from './checks';
import { cautionsForStage } from './cautions';

const T = (h: number) => new Date(Date.UTC(2026, 2, 1, 0) + h * 3_600_000).toISOString();

function base(over: Partial<RunCheckInput> = {}): RunCheckInput {
  return {
    stages: [
      { stage: 'drying', startedAt: T(-30), endedAt: T(-2) },
      { stage: 'vacuum', startedAt: T(0), endedAt: T(4) },
      { stage: 'soak', startedAt: T(4), endedAt: T(14) },
      { stage: 'cure', startedAt: T(15), endedAt: T(18), ovenSetC: 110, ovenMeasuredC: 105 },
    ],
    resin: { name: 'Test resin', cureMinC: 93, cureMaxC: 121, shelfLifeDays: 365 },
    lot: { code: 'L1', activatedAt: '2026-01-01', status: 'active' },
    coupons: [
      { id: 1, tag: 'A', thicknessMm: 20, hasDryWeighing: true, dryingChecks: [{ at: T(-10), massG: 50.0 }, { at: T(-6), massG: 49.98 }] },
    ],
    dryingRule: { minIntervalHours: 2, maxChangePct: 0.1 },
    now: new Date(T(20)),
    ...over,
  };
}
const status = (input: RunCheckInput, rule: RunRule) => runChecks(input).find((c) => c.rule === rule);

describe('run rule checks on crafted runs', () => {
  it('passes a run that keeps every rule', () => {
    expect(runChecks(base()).map((c) => [c.rule, c.status])).toEqual([
      ['dry-weighings', 'ok'],
      ['drying-constant-mass', 'ok'],
      ['lot-shelf-life', 'ok'],
      ['soak-time', 'ok'],
      ['cure-temperature', 'ok'],
      ['cure-time', 'ok'],
    ]);
  });

  it('fails a soak shorter than twice the vacuum', () => {
    const stages = base().stages.map((s) => (s.stage === 'soak' ? { ...s, endedAt: T(11) } : s.stage === 'cure' ? { ...s, startedAt: T(12) } : s));
    const c = status(base({ stages }), 'soak-time');
    expect(c?.status).toBe('fail');
    expect(c?.reason).toMatch(/7 h, less than twice the 4 h vacuum \(8 h\)/);
  });

  it('fails a cure at 130 °C, judged by the thermometer over the set point', () => {
    const hot = base().stages.map((s) => (s.stage === 'cure' ? { ...s, ovenSetC: 110, ovenMeasuredC: 130 } : s));
    expect(status(base({ stages: hot }), 'cure-temperature')).toMatchObject({ status: 'fail' });
    expect(status(base({ stages: hot }), 'cure-temperature')?.reason).toMatch(/thermometer.*130 °C/);
    // A set point inside the window with a thermometer reading low below it still fails: small ovens read low.
    const low = base().stages.map((s) => (s.stage === 'cure' ? { ...s, ovenSetC: 100, ovenMeasuredC: 88 } : s));
    expect(status(base({ stages: low }), 'cure-temperature')?.status).toBe('fail');
    const setOnly = base().stages.map((s) => (s.stage === 'cure' ? { ...s, ovenSetC: 107, ovenMeasuredC: null } : s));
    expect(status(base({ stages: setOnly }), 'cure-temperature')?.status).toBe('warn');
  });

  it('uses the 93–121 °C window when no resin is recorded', () => {
    const hot = base().stages.map((s) => (s.stage === 'cure' ? { ...s, ovenMeasuredC: 122 } : s));
    expect(status(base({ stages: hot, resin: null, lot: null }), 'cure-temperature')?.status).toBe('fail');
  });

  it('fails an expired lot and warns near the end of its shelf life', () => {
    expect(status(base({ lot: { code: 'OLD', activatedAt: '2025-01-01', status: 'active' } }), 'lot-shelf-life')).toMatchObject({ status: 'fail' });
    expect(status(base({ lot: { code: 'OLD', activatedAt: '2025-01-01', status: 'active' } }), 'lot-shelf-life')?.reason).toMatch(/424 days old.*365-day/);
    expect(status(base({ lot: { code: 'NEAR', activatedAt: '2025-03-20', status: 'active' } }), 'lot-shelf-life')?.status).toBe('warn');
  });

  it('warns when drying did not reach constant mass, and waits while drying is still open', () => {
    const notDry = [{ id: 1, tag: 'A', thicknessMm: 20, hasDryWeighing: true, dryingChecks: [{ at: T(-10), massG: 50.0 }, { at: T(-6), massG: 49.5 }] }];
    const c = status(base({ coupons: notDry }), 'drying-constant-mass');
    expect(c).toMatchObject({ status: 'warn', couponIds: [1] });
    const open = [{ stage: 'drying' as const, startedAt: T(-30), endedAt: null }];
    expect(status(base({ coupons: notDry, stages: open }), 'drying-constant-mass')?.status).toBe('pending');
  });

  it('fails coupons that went under vacuum without a dry weighing', () => {
    const coupons = [{ id: 7, tag: 'B', thicknessMm: null, hasDryWeighing: false, dryingChecks: [] }];
    expect(status(base({ coupons }), 'dry-weighings')).toMatchObject({ status: 'fail', couponIds: [7] });
    expect(status(base({ coupons, stages: [] }), 'dry-weighings')?.status).toBe('pending');
  });

  it('fails a cure shorter than 2 h', () => {
    const short = base().stages.map((s) => (s.stage === 'cure' ? { ...s, endedAt: T(16.5) } : s));
    expect(status(base({ stages: short }), 'cure-time')).toMatchObject({ status: 'fail' });
  });
});

describe('cautions', () => {
  it('shows the vacuum and oven reminders at their stages and the governing rules everywhere', () => {
    expect(cautionsForStage('vacuum').map((c) => c.id)).toEqual(['vacuum-chamber', 'resin-handling', 'governing-rules']);
    expect(cautionsForStage('cure').map((c) => c.id)).toContain('cure-oven');
    expect(cautionsForStage('drying').map((c) => c.id)).toEqual(['governing-rules']);
  });
});
