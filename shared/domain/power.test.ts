import { describe, expect, it } from 'vitest';
import { DomainError } from './errors';
import { twoSampleSampleSize, twoSampleTPower } from './power';

describe('two-sample t power and sample size', () => {
  // R's power.t.test (stats package), type "two.sample", two-sided, strict = FALSE; the values are
  // those R prints, recalled from memory (the first two are the examples on its help page).
  it.each([{ call: 'power.t.test(n = 20, delta = 1)', n: 20, delta: 1, sd: 1, power: 0.8689528 }])('power: $call → $power', ({ n, delta, sd, power }) => {
    expect(twoSampleTPower(n, delta, sd)).toBeCloseTo(power, 6);
  });

  it.each([
    { call: 'power.t.test(power = .90, delta = 1)', delta: 1, sd: 1, power: 0.9, n: 22.0211 },
    { call: 'power.t.test(power = .80, delta = 1)', delta: 1, sd: 1, power: 0.8, n: 16.71477 },
    { call: 'power.t.test(power = .80, delta = 0.5)', delta: 0.5, sd: 1, power: 0.8, n: 63.76576 },
    { call: 'the same in WPG points: delta = 4, sd = 8', delta: 4, sd: 8, power: 0.8, n: 63.76576 },
  ])('n: $call → $n', ({ delta, sd, power, n }) => {
    const r = twoSampleSampleSize(delta, sd, power);
    expect(r.nExact).toBeCloseTo(n, 4);
    expect(r.nPerGroup).toBe(Math.ceil(n));
    expect(r.power).toBeGreaterThanOrEqual(power);
  });

  // Cohen (1988) Statistical Power Analysis for the Behavioral Sciences, 2nd ed., Table 2.4.1:
  // n per group for power .80 at two-tailed α = .05 (values from memory).
  it.each([
    { d: 0.2, n: 393 },
    { d: 0.5, n: 64 },
    { d: 0.8, n: 26 },
  ])('Cohen Table 2.4.1: d = $d → $n per group', ({ d, n }) => {
    // Cohen's table rounds to the nearest whole coupon, not up; ours rounds up, so it is n or n + 1.
    const r = twoSampleSampleSize(d, 1);
    expect(Math.abs(r.nExact - n)).toBeLessThan(1);
  });

  it('refuses a zero difference or spread', () => {
    expect(() => twoSampleSampleSize(0, 1)).toThrow(DomainError);
    expect(() => twoSampleSampleSize(1, 0)).toThrow(DomainError);
    expect(() => twoSampleTPower(1, 1, 1)).toThrow(DomainError);
  });
});
