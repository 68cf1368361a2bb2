import { describe, expect, it } from 'vitest';
import { reachedConstantMass } from './index';

const at = (hours: number) => new Date(Date.UTC(2024, 0, 1) + hours * 3_600_000);

describe('reachedConstantMass (ASTM D4442 "to constant mass"; criteria set by the shop)', () => {
  // Criteria of EN 13183-1 as quoted in a secondary source: a change of less than 0.1 % over 2 h.
  const criteria = { minIntervalHours: 2, maxChangePct: 0.1 };
  // [case, readings (hour, g), reached, lastChangePct, intervalHours]
  const rows: [string, [number, number][], boolean, number | null, number | null][] = [
    ['no readings', [], false, null, null],
    ['one reading', [[0, 100]], false, null, null],
    [
      'two readings only 1 h apart',
      [
        [0, 100],
        [1, 99.99],
      ],
      false,
      null,
      null,
    ],
    [
      'still losing 1 % in 2 h',
      [
        [0, 100],
        [2, 99],
      ],
      false,
      -1,
      2,
    ],
    [
      '0.05 % in 2 h: constant',
      [
        [0, 100],
        [2, 99.95],
      ],
      true,
      -0.05,
      2,
    ],
    [
      'exactly 0.1 % is not less than 0.1 %, so not constant',
      [
        [0, 100],
        [2, 99.9],
      ],
      false,
      -0.1,
      2,
    ],
    [
      'compares with the latest reading at least 2 h earlier',
      [
        [0, 110],
        [3, 100],
        [4, 99.99],
        [5, 99.98],
      ],
      true,
      -0.02,
      2,
    ],
    [
      'readings out of order are sorted',
      [
        [5, 99.98],
        [0, 110],
        [3, 100],
      ],
      true,
      -0.02,
      2,
    ],
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
    expect(result).toMatchObject({ reached: true, lastChangePct: expect.closeTo(0.04, 10), intervalHours: 4.5 });
  });
});

describe('reachedConstantMass at its edges: "less than", roundoff at the limit, the weighings in between', () => {
  const criteria = { minIntervalHours: 2, maxChangePct: 0.1 };
  const run = (readings: [number, number][]) =>
    reachedConstantMass(
      readings.map(([h, m]) => ({ at: at(h), massG: m })),
      criteria,
    );

  it.each([
    // By hand: each change is exactly 0.1 % in decimal, but the quotient rounds to just under or just over it.
    [[50, 49.95]],
    [[250, 249.75]],
    [[1000, 999]],
    [[20, 20.02]],
  ])('a change of exactly 0.1 %% (%j) is not less than 0.1 %%, however the division rounds', ([a, b]) => {
    expect(
      run([
        [0, a as number],
        [2, b as number],
      ]).reached,
    ).toBe(false);
  });

  it('a weighing in between that moved more than the limit keeps the pair from counting (0 h 50, 1 h 49.9, 2 h 50)', () => {
    const r = run([
      [0, 50],
      [1, 49.9],
      [2, 50],
    ]);
    expect(r.lastChangePct).toBe(0);
    expect(r.largestChangePct).toBeCloseTo(-0.2, 10);
    expect(r.reached).toBe(false);
  });

  it('says what it compared: the two weighings, their times, and how many readings lay between', () => {
    const r = run([
      [0, 110],
      [3, 100],
      [4, 99.99],
      [5, 99.98],
    ]);
    expect(r.compared).toEqual({
      from: { at: at(3).toISOString(), massG: 100 },
      to: { at: at(5).toISOString(), massG: 99.98 },
      readings: 3,
    });
  });
});
