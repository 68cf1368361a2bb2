import { describe, expect, it } from 'vitest';
import { antiSwell, antiSwellForList, couponMetrics, type CheckReading, type WeighingReading } from './metrics';

// Worked by hand from the definitions (oven-dry basis MC; WPG; retention-style loading; porosity with a
// cell-wall density of 1.5 g/cm³; volumetric change); the numbers are chosen to come out round.
const at = (d: number) => new Date(Date.UTC(2026, 0, d)).toISOString();
const w = (stage: WeighingReading['stage'], massG: number, d = 1): WeighingReading => ({ stage, massG, measuredAt: at(d) });
const dim = (stage: CheckReading['stage'], l: number, wd: number, t: number, d = 1): CheckReading => ({
  kind: 'dimension',
  stage,
  measuredAt: at(d),
  lengthMm: l,
  widthMm: wd,
  thicknessMm: t,
});

describe('couponMetrics', () => {
  const treated = couponMetrics({
    role: 'treated',
    weighings: [w('drying-check', 10.8, 1), w('drying-check', 10.1, 2), w('dry', 10, 3), w('soaked', 17, 4), w('cured', 16, 5), w('wet-test', 16.4, 6)],
    checks: [dim('dry', 100, 20, 10, 3), dim('cured', 100, 20, 10.2, 5), dim('wet-test', 100, 20, 10.302, 6)],
    resin: { curedDensityGcm3: 1.2 },
  });

  it('works out volume, density and SG from the dry mass and calipers', () => {
    expect(treated.dryVolumeCm3).toBeCloseTo(20, 10);
    expect(treated.drySg).toBeCloseTo(0.5, 10);
    expect(treated.dryDensityKgM3).toBeCloseTo(500, 8);
    expect(treated.thicknessMm).toBe(10);
  });

  it('takes MC from the first drying check against the dry mass when no meter reading exists', () => {
    expect(treated.mcSource).toBe('drying-check-mass');
    expect(treated.mcPct).toBeCloseTo(8, 10);
  });

  it('gives WPG, wet uptake, loading, void fill, the maximum, cure loss and bulking', () => {
    expect(treated.wpgPct).toBeCloseTo(60, 10);
    expect(treated.wetUptakePct).toBeCloseTo(70, 10);
    expect(treated.resinLoadingKgM3).toBeCloseTo(300, 8);
    // void volume 20 × (1 − 0.5/1.5) = 13.33 cm³; resin 6 g / 1.2 g/cm³ = 5 cm³ → 37.5 %
    expect(treated.voidFillPct).toBeCloseTo(37.5, 8);
    // (1/0.5 − 1/1.5) × 1.2 × 100
    expect(treated.maxWpgPct).toBeCloseTo(160, 8);
    expect(treated.cureLossPct).toBeCloseTo((1 / 7) * 100, 10);
    expect(treated.bulkingPct).toBeCloseTo(2, 8);
  });

  it('measures a treated coupon’s water-soak swelling from its cured volume', () => {
    expect(treated.swellingBasis).toBe('volume');
    expect(treated.swellingPct).toBeCloseTo(1, 8);
  });

  it('prefers a meter reading for MC and falls back to mass gain for swelling when only masses exist', () => {
    const control = couponMetrics({
      role: 'control',
      weighings: [w('dry', 10, 1), w('wet-test', 12, 2)],
      checks: [{ kind: 'moisture', stage: 'dry', measuredAt: at(1), moisturePct: 4 }],
    });
    expect(control).toMatchObject({ mcPct: 4, mcSource: 'moisture-check', swellingBasis: 'mass' });
    expect(control.swellingPct).toBeCloseTo(20, 10);
    expect(control.wpgPct).toBeNull();
  });

  it('leaves a contradicted metric blank with the reason instead of a number', () => {
    const m = couponMetrics({ role: 'treated', weighings: [w('dry', 10), w('soaked', 12), w('cured', 13)], checks: [] });
    expect(m.cureLossPct).toBeNull();
    expect(m.problems).toEqual([{ metric: 'cureLossPct', message: expect.stringMatching(/cured mass is above the soaked mass/) }]);
  });

  it('uses an immersion volume when given and keeps hardness on its own scale', () => {
    const m = couponMetrics({
      role: 'treated',
      weighings: [w('dry', 12)],
      checks: [
        { kind: 'dimension', stage: 'dry', measuredAt: at(1), volumeCm3: 24 },
        { kind: 'hardness', stage: 'cured', measuredAt: at(2), hardnessValue: 70, hardnessScale: 'shore-d' },
        { kind: 'hardness', stage: 'cured', measuredAt: at(3), hardnessValue: 74, hardnessScale: 'shore-d' },
        { kind: 'hardness', stage: 'cured', measuredAt: at(3), hardnessValue: 5200, hardnessScale: 'janka-n' },
      ],
    });
    expect(m.drySg).toBeCloseTo(0.5, 10);
    expect(m.hardness).toEqual([
      { stage: 'cured', scale: 'shore-d', value: 74 },
      { stage: 'cured', scale: 'janka-n', value: 5200 },
    ]);
  });
});

describe('anti-swell efficiency against controls', () => {
  it('compares with the mean swelling of same-basis controls: ASE = (S_c − S_t)/S_c × 100', () => {
    const r = antiSwell({ swellingPct: 1, swellingBasis: 'volume' }, [
      { swellingPct: 4, swellingBasis: 'volume' },
      { swellingPct: 6, swellingBasis: 'volume' },
      { swellingPct: 30, swellingBasis: 'mass' },
    ]);
    expect(r).toEqual({ asePct: 80, basis: 'volume', measure: 'ase', name: 'Anti-swell efficiency (ASE)', controlSwellingPct: 5, controlCount: 2 });
    expect(antiSwell({ swellingPct: 1, swellingBasis: 'volume' }, [{ swellingPct: 20, swellingBasis: 'mass' }])).toBeNull();
  });

  it('pairs coupons with the controls of their own trial and species only', () => {
    const m = (s: number) => ({ swellingPct: s, swellingBasis: 'volume' as const });
    const out = antiSwellForList([
      { trialId: 1, speciesId: 1, role: 'treated', metrics: m(1) },
      { trialId: 1, speciesId: 1, role: 'control', metrics: m(5) },
      { trialId: 1, speciesId: 2, role: 'treated', metrics: m(1) },
      { trialId: 2, speciesId: 1, role: 'control', metrics: m(10) },
    ]);
    expect(out.map((a) => a?.asePct ?? null)).toEqual([80, null, null, null]);
  });
});

describe('a cured mass below the dry mass blanks WPG like the other metrics', () => {
  it('gives no WPG (instead of −3.3 %) and names the contradiction', () => {
    const m = couponMetrics({ role: 'treated', weighings: [w('dry', 30, 1), w('cured', 29, 2)], checks: [], resin: null });
    expect(m.wpgPct).toBeNull();
    expect(m.problems).toContainEqual({ metric: 'wpgPct', message: expect.stringMatching(/below the dry mass/) });
  });
});

describe('the mass-basis efficiency is named for what it is', () => {
  it('calls (U_control − U_treated)/U_control on water uptake by mass a water-repellent effectiveness, not an ASE (Rowell & Ellis 1978, from memory)', () => {
    // By hand: controls took up 20 % and 30 % water by mass (mean 25 %), the treated coupon 5 %: (25 − 5)/25 = 80 %.
    const r = antiSwell({ swellingPct: 5, swellingBasis: 'mass' }, [
      { swellingPct: 20, swellingBasis: 'mass' },
      { swellingPct: 30, swellingBasis: 'mass' },
    ]);
    expect(r).toMatchObject({ asePct: 80, basis: 'mass', measure: 'wre', name: 'Water-repellent effectiveness (WRE)' });
  });
});
