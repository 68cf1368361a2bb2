import { describe, expect, it } from 'vitest';
import { reachedConstantMass } from './index';

const at = (hours: number) => new Date(Date.UTC(2024, 0, 1) + hours * 3_600_000);

describe('reachedConstantMass (ASTM D4442 "to constant mass"; criteria set by the shop)', () => {
  // Criteria of EN 13183-1 as quoted in a secondary source: ≤ 0.1 % change over 2 h.
  const criteria = { minIntervalHours: 2, maxChangePct: 0.1 };
  // [case, readings (hour, g), reached, lastChangePct, intervalHours]
  const rows: [string, [number, number][], boolean, number | null, number | null][] = [
    ['no readings', [], false, null, null],
    ['one reading', [[0, 100]], false, null, null],
    ['two readings only 1 h apart', [[0, 100], [1, 99.99]], false, null, null],
    ['still losing 1 % in 2 h', [[0, 100], [2, 99]], false, -1, 2],
    ['0.05 % in 2 h: constant', [[0, 100], [2, 99.95]], true, -0.05, 2],
    ['exactly 0.1 % counts as constant (≤)', [[0, 100], [2, 99.9]], true, -0.1, 2],
    ['compares with the latest reading at least 2 h earlier', [[0, 110], [3, 100], [4, 99.99], [5, 99.98]], true, -0.02, 2],
    ['readings out of order are sorted', [[5, 99.98], [0, 110], [3, 100]], true, -0.02, 2],
  ];
  it.each(rows)('%s', (_case, readings, reached, change, interval) => {
    const result = reachedConstantMass(
      readings.map(([h, m]) => ({ at: at(h), massG: m })),
      criteria,
    );
    expect(result.reached).toBe(reached);
    if (change === null) expect(result.lastChangePct).toBeNull();
    else expect(result.lastChangePct).toBeCloseTo(change, 10);
    expect(result.intervalHours).toBe(interval);
  });

  it('accepts ISO 8601 strings for the time of a weighing', () => {
    const result = reachedConstantMass(
      [
        { at: '2024-03-01T08:00:00Z', massG: 250 },
        { at: '2024-03-01T12:30:00Z', massG: 250.1 },
      ],
      criteria,
    );
    expect(result).toEqual({ reached: true, lastChangePct: expect.closeTo(0.04, 10), intervalHours: 4.5 });
  });
});
