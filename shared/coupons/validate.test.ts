import { describe, expect, it } from 'vitest';
import { checkProblems, weighingProblem } from './validate';

describe('impossible measurements', () => {
  it('refuses non-positive masses and cured or soaked below dry', () => {
    expect(weighingProblem('dry', 0, {})?.field).toBe('massG');
    expect(weighingProblem('cured', -1, {})?.message).toMatch(/greater than 0/);
    expect(weighingProblem('cured', 9.9, { dry: 10 })?.message).toMatch(/cannot be below the dry mass/);
    expect(weighingProblem('soaked', 9.9, { dry: 10 })).not.toBeNull();
    expect(weighingProblem('cured', 10, { dry: 10 })).toBeNull();
    expect(weighingProblem('dry', 12, { cured: 11 })?.message).toMatch(/cannot be above the cured mass/);
    // A water test or a drying check may sit on either side of the dry mass.
    expect(weighingProblem('wet-test', 9, { dry: 10 })).toBeNull();
    expect(weighingProblem('drying-check', 12, { dry: 10 })).toBeNull();
  });

  it('refuses moisture outside 0–300 %, Shore D outside 0–100 and non-positive sizes', () => {
    expect(checkProblems({ kind: 'moisture', moisturePct: -1 })[0]?.field).toBe('moisturePct');
    expect(checkProblems({ kind: 'moisture', moisturePct: 301 })).toHaveLength(1);
    expect(checkProblems({ kind: 'moisture', moisturePct: 300 })).toHaveLength(0);
    expect(checkProblems({ kind: 'hardness', hardnessValue: 101, hardnessScale: 'shore-d' })[0]?.field).toBe('hardnessValue');
    expect(checkProblems({ kind: 'hardness', hardnessValue: 4500, hardnessScale: 'janka-n' })).toHaveLength(0);
    expect(checkProblems({ kind: 'hardness', hardnessValue: 0, hardnessScale: 'brinell-hb' })).toHaveLength(1);
    expect(checkProblems({ kind: 'dimension', lengthMm: 0, widthMm: -2, thicknessMm: 10 }).map((p) => p.field)).toEqual(['lengthMm', 'widthMm']);
  });
});
