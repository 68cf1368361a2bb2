import { describe, expect, it } from 'vitest';
import { runChecks, type RunCheckInput, type RunRule } from './checks';
import { cautionsForStage } from './cautions';
import { formatDuration } from './format';
import { dueItems } from './timers';

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
      {
        id: 1,
        tag: 'A',
        thicknessMm: 20,
        hasDryWeighing: true,
        dryingChecks: [
          { at: T(-10), massG: 50.0 },
          { at: T(-6), massG: 49.98 },
        ],
      },
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
    expect(c?.reason).toMatch(/7 h \(from its start to its end\), less than twice the 4 h vacuum \(8 h\)/);
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
    const notDry = [
      {
        id: 1,
        tag: 'A',
        thicknessMm: 20,
        hasDryWeighing: true,
        dryingChecks: [
          { at: T(-10), massG: 50.0 },
          { at: T(-6), massG: 49.5 },
        ],
      },
    ];
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

describe('the cure window is 200–250 °F as the trade states it, checked at its edges in both unit systems', () => {
  // Common practice, no published source: cure at about 200–250 °F. °C = (°F − 32) × 5/9 (NIST SP 811).
  const F = (f: number) => ((f - 32) * 5) / 9;
  const at = (c: number) => base().stages.map((s) => (s.stage === 'cure' ? { ...s, ovenMeasuredC: c } : s));
  const noResin = { resin: null, lot: null };
  // [reading, °C stored, expected status, how it was typed]
  const rows: [string, number, 'ok' | 'fail'][] = [
    ['exactly 250 °F', F(250), 'ok'],
    ['exactly 200 °F', F(200), 'ok'],
    ['199.5 °F', F(199.5), 'fail'],
    ['199.9 °F (0.1 °F below)', F(199.9), 'fail'],
    ['250.1 °F (0.1 °F above)', F(250.1), 'fail'],
    ['121.1 °C (the upper end as a metric user sees it)', 121.1, 'ok'],
    ['93.3 °C (the lower end as a metric user sees it)', 93.3, 'ok'],
    ['121.2 °C', 121.2, 'fail'],
    ['93.2 °C', 93.2, 'fail'],
  ];
  it.each(rows)('an oven at %s is %s… (°C %d)', (_typed, c, expected) => {
    for (const units of ['metric', 'us'] as const) {
      expect(status(base({ stages: at(c), ...noResin, units }), 'cure-temperature')?.status).toBe(expected === 'ok' ? 'ok' : 'fail');
    }
  });

  it("shows the window and the reading in the reader's units with sensible rounding", () => {
    const us = status(base({ stages: at(F(250)), ...noResin, units: 'us' }), 'cure-temperature')?.reason;
    expect(us).toBe('The thermometer in the oven read 250 °F, inside 200–250 °F (the usual window; no resin is recorded).');
    const metric = status(base({ stages: at(F(250)), ...noResin, units: 'metric' }), 'cure-temperature')?.reason;
    expect(metric).toBe('The thermometer in the oven read 121.11 °C, inside 93.3–121.1 °C (the usual window; no resin is recorded).');
    expect(status(base({ stages: at(F(199.5)), ...noResin, units: 'us' }), 'cure-temperature')?.reason).toMatch(/read 199\.5 °F, outside 200–250 °F/);
  });
});

describe('the soak check and the soak timer use one definition', () => {
  it('vacuum 0–4 h, soak from 5 h: the timer says drainable at 13 h and the check passes a soak ending then, fails one ending at 12 h', () => {
    const vacuum = { stage: 'vacuum' as const, startedAt: T(0), endedAt: T(4) };
    const soakOpen = { stage: 'soak' as const, startedAt: T(5), endedAt: null };
    const due = dueItems([vacuum, soakOpen], new Date(T(6))).items.find((i) => i.kind === 'soak-minimum');
    expect(due?.dueAt).toBe(T(13));
    const ending = (h: number) => base({ stages: [base().stages[0]!, vacuum, { ...soakOpen, endedAt: T(h) }] });
    expect(status(ending(13), 'soak-time')?.status).toBe('ok');
    expect(status(ending(12), 'soak-time')).toMatchObject({ status: 'fail' });
    expect(status(ending(12), 'soak-time')?.reason).toMatch(/lasted 7 h \(from its start to its end\), less than twice the 4 h vacuum \(8 h\)/);
    // While soaking, the check names the same moment the timer counts down to.
    expect(status(base({ stages: [vacuum, soakOpen] }), 'soak-time')?.reason).toContain(T(13));
  });
});

describe('durations in words show what was compared', () => {
  it('a 479.7-minute soak after a 4 h vacuum reads "7 h 59 min 42 s", not "8 h"', () => {
    const stages = [
      { stage: 'vacuum' as const, startedAt: T(0), endedAt: T(4) },
      { stage: 'soak' as const, startedAt: T(4), endedAt: T(4 + 479.7 / 60) },
    ];
    const c = status(base({ stages }), 'soak-time');
    expect(c?.status).toBe('fail');
    expect(c?.reason).toMatch(/lasted 7 h 59 min 42 s .*\(8 h\)/);
  });

  it.each([
    [480, '8 h'],
    [479.7, '7 h 59 min 42 s'],
    [45, '45 min'],
    [0.5, '30 s'],
    [125, '2 h 5 min'],
  ])('formatDuration(%d min) = %s', (minutes, text) => {
    expect(formatDuration(minutes)).toBe(text);
  });
});

describe('drying to constant mass says what it compared', () => {
  it('shows the change, the two times and the largest change in between for a coupon that did not make it', () => {
    const coupons = [
      {
        id: 1,
        tag: 'A',
        thicknessMm: 20,
        hasDryWeighing: true,
        dryingChecks: [
          { at: T(-10), massG: 50 },
          { at: T(-9), massG: 49.9 },
          { at: T(-8), massG: 50 },
        ],
      },
    ];
    const c = status(base({ coupons }), 'drying-constant-mass');
    expect(c?.status).toBe('warn');
    expect(c?.reason).toContain(`A changed 0 % from ${T(-10)} to ${T(-8)} (2 h, -0.2 % at most in between)`);
    expect(c?.reason).toMatch(/differing from the first by less than 0\.1 %/);
  });

  it('does not count a change of exactly 0.1 % as constant (the rule says "less than")', () => {
    const coupons = [
      {
        id: 1,
        tag: 'A',
        thicknessMm: 20,
        hasDryWeighing: true,
        dryingChecks: [
          { at: T(-10), massG: 50 },
          { at: T(-6), massG: 49.95 },
        ],
      },
    ];
    expect(status(base({ coupons }), 'drying-constant-mass')?.status).toBe('warn');
  });
});

describe('contradictions are not reported as OK', () => {
  it('fails a lot activated 10 days after the vacuum started instead of calling it "−10 days old … within shelf life"', () => {
    const c = status(base({ lot: { code: 'LATE', activatedAt: '2026-03-11', status: 'active' } }), 'lot-shelf-life');
    expect(c?.status).toBe('fail');
    expect(c?.reason).toMatch(/activated on 2026-03-11, after the vacuum started \(2026-03-01\)/);
    expect(c?.reason).not.toMatch(/-\d+ days old/);
  });
});
