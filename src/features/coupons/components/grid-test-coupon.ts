import type { CouponOut } from '../../../../shared/schemas/coupons';
import { fromDisplay, toDisplay, type UnitSystem } from '../../../../shared/units';
import type { SiConverter } from './grid-model';

// Test-only helpers for the grid's pure modules (imported only by *.test.ts).

let nextId = 1;

/** An invented treated coupon with no readings; `over` sets what a test needs. */
export function testCoupon(over: Partial<CouponOut> = {}): CouponOut {
  const id = over.id ?? nextId++;
  return {
    id,
    tag: `T-${id}`,
    version: 1,
    trialId: null,
    trialCode: null,
    conditionId: null,
    condition: null,
    speciesId: 1,
    speciesName: 'Test maple',
    speciesDensity: { basicSg: null, sg12: null, measuredDensityKgM3: null, measuredMoisturePct: null, sgCoefficientOfVariation: null },
    role: 'treated',
    sourceBoard: null,
    runId: null,
    runCode: null,
    notes: null,
    createdAt: '2026-01-01T00:00:00.000Z',
    resin: { id: 1, name: 'Test resin', curedDensityGcm3: 1.1, liquidDensityGcm3: 1.05 },
    weighings: [],
    checks: [],
    metrics: {} as CouponOut['metrics'],
    antiSwell: null,
    warnings: [],
    ...over,
  };
}

export function weighing(couponId: number, stage: CouponOut['weighings'][number]['stage'], massG: number, measuredAt = '2026-01-02T00:00:00.000Z') {
  return {
    id: Math.floor(Math.random() * 1e9),
    couponId,
    stage,
    massG,
    measuredAt,
    importId: null,
    source: 'entry',
    supersededBy: null,
    deletedAt: null,
    createdAt: measuredAt,
    createdBy: null,
  };
}

export const converter = (system: UnitSystem): SiConverter => ({
  fromDisplay: (v, q) => fromDisplay(v, q, system),
  toDisplay: (v, q) => toDisplay(v, q, system),
});
