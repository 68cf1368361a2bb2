import { describe, expect, it } from 'vitest';
import { planningWarnings, type PlannedCondition } from './planning';

const ctx = {
  speciesName: (id: number) => ({ 1: 'Maple, red', 2: 'Buckeye, yellow' })[id] ?? `species ${id}`,
  resin: (id: number) => ({ 10: { name: 'Clear', cureMinC: 93, cureMaxC: 121 }, 11: { name: 'Dyed', cureMinC: 93, cureMaxC: 121 } })[id],
};
const cell = (speciesId: number, resinId: number, more: Partial<PlannedCondition> = {}): PlannedCondition => ({
  speciesId,
  resinId,
  processLabel: 'standard',
  couponsWanted: 4,
  ...more,
});

describe('planning warnings', () => {
  it('has nothing to say about a full grid with enough coupons and controls', () => {
    expect(planningWarnings({ controlsPerSpecies: 2, conditions: [cell(1, 10), cell(1, 11), cell(2, 10), cell(2, 11)] }, ctx)).toEqual([]);
  });

  it('flags fewer than 3 coupons per condition', () => {
    const w = planningWarnings({ controlsPerSpecies: 2, conditions: [cell(1, 10, { couponsWanted: 2 })] }, ctx);
    expect(w).toEqual([expect.objectContaining({ code: 'few-coupons', conditionIndex: 0 })]);
    expect(w[0]!.message).toMatch(/2 coupons is too few to see a difference from noise/);
    expect(planningWarnings({ controlsPerSpecies: 2, conditions: [cell(1, 10, { couponsWanted: 3 })] }, ctx)).toEqual([]);
  });

  it('flags each species without controls', () => {
    const w = planningWarnings({ controlsPerSpecies: 0, conditions: [cell(1, 10), cell(2, 10)] }, ctx);
    expect(w.map((x) => [x.code, x.speciesId])).toEqual([
      ['no-controls', 1],
      ['no-controls', 2],
    ]);
  });

  it('flags the missing species × resin cell of an otherwise full grid', () => {
    const w = planningWarnings({ controlsPerSpecies: 2, conditions: [cell(1, 10), cell(1, 11), cell(2, 10)] }, ctx);
    expect(w).toEqual([expect.objectContaining({ code: 'missing-cell', speciesId: 2, resinId: 11 })]);
  });

  it('flags a cure outside the resin window and a soak shorter than twice the vacuum', () => {
    const w = planningWarnings({ controlsPerSpecies: 2, conditions: [cell(1, 10, { cureTempC: 130, vacuumMinutes: 240, soakMinutes: 300 })] }, ctx);
    expect(w.map((x) => x.code)).toEqual(['cure-outside-window', 'short-soak']);
  });
});

describe("planning warnings speak the reader's units", () => {
  it('a US-units plan at 260 °F reads "260 °F … 200–250 °F", never "126.66666666666667 °C"', () => {
    const resin = { name: 'Clear', cureMinC: ((200 - 32) * 5) / 9, cureMaxC: ((250 - 32) * 5) / 9 };
    const us = { ...ctx, resin: () => resin, units: 'us' as const };
    const w = planningWarnings({ controlsPerSpecies: 2, conditions: [cell(1, 10, { cureTempC: ((260 - 32) * 5) / 9 })] }, us);
    expect(w[0]?.message).toMatch(/a cure at 260 °F is outside Clear's window of 200–250 °F$/);
    // 250 °F typed by a US user is inside; the old 93–121 °C window flagged it.
    expect(planningWarnings({ controlsPerSpecies: 2, conditions: [cell(1, 10, { cureTempC: ((250 - 32) * 5) / 9 })] }, us)).toEqual([]);
    const metric = planningWarnings({ controlsPerSpecies: 2, conditions: [cell(1, 10, { cureTempC: 126.6 })] }, { ...us, units: 'metric' });
    expect(metric[0]?.message).toMatch(/a cure at 126\.6 °C is outside Clear's window of 93\.3–121\.1 °C$/);
  });
});
