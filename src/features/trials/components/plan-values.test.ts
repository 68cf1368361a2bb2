import { describe, expect, it } from 'vitest';
import type { Trial } from '../../../../shared/schemas/trials';
import { unitsFor } from '../../../lib/use-units';
import { buildPlan, planValuesFromTrial } from './plan-values';

const condition = (speciesId: number, resinId: number, processLabel: string, couponsWanted: number) => ({
  speciesId,
  resinId,
  processLabel,
  couponsWanted,
  vacuumMinutes: 240,
  soakMinutes: processLabel === 'long soak' ? 1440 : 480,
  cureTempC: 107,
  cureMinutes: 150,
  thicknessMm: 25.4,
});

// A plan with two processes, one cell left out of the second, and one cell off the usual count.
const trial = {
  title: 'Soak length',
  question: 'Does a longer soak raise uptake?',
  controlsPerSpecies: 2,
  notes: null,
  conditions: [
    condition(1, 10, 'short soak', 4),
    condition(2, 10, 'short soak', 4),
    condition(1, 10, 'long soak', 6),
    condition(2, 10, 'long soak', 4),
    condition(1, 11, 'short soak', 4),
    condition(2, 11, 'short soak', 4),
    condition(2, 11, 'long soak', 4),
  ],
} as unknown as Trial;

describe('planValuesFromTrial', () => {
  it.each(['metric', 'us'] as const)('rebuilds the same conditions when saved again (%s display units)', (system) => {
    const u = unitsFor(system);
    const values = planValuesFromTrial(trial, { temp: (c) => u.toDisplay(c, 'temperature'), length: (mm) => u.toDisplay(mm, 'length') });
    expect(values.couponsPerCondition).toBe(4);
    const rebuilt = buildPlan(values, { tempToC: (v) => u.fromDisplay(v, 'temperature'), lengthToMm: (v) => u.fromDisplay(v, 'length') }).input;
    const key = (c: { speciesId?: number; resinId?: number; processLabel?: string }) => `${c.speciesId}|${c.resinId}|${c.processLabel}`;
    const byKey = new Map(rebuilt.conditions.map((c) => [key(c), c]));
    expect(rebuilt.conditions).toHaveLength(trial.conditions.length);
    for (const c of trial.conditions) {
      const r = byKey.get(key(c));
      expect(r?.couponsWanted).toBe(c.couponsWanted);
      expect(r?.soakMinutes).toBe(c.soakMinutes);
      // Display rounding (0.1 °F, 0.001 in) must not move the stored values by more than that.
      expect(r?.cureTempC).toBeCloseTo(c.cureTempC!, 1);
      expect(r?.thicknessMm).toBeCloseTo(c.thicknessMm!, 1);
    }
  });
});
