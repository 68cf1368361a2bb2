import { bench, describe } from 'vitest';
import { fitLinear, fitMultiple, summarize, welchTest } from './index';

// A deterministic pseudo-random stream (Park–Miller minimal standard), so every run times the same data.
function stream(seed: number): () => number {
  let s = seed;
  return () => {
    s = (s * 16807) % 2147483647;
    return s / 2147483647;
  };
}

/** Coupons shaped like a large uptake study: oven-dry SG 0.3–0.9, thickness 10–60 mm, WPG with noise. */
function study(n: number) {
  const next = stream(42);
  const density = Array.from({ length: n }, () => 0.3 + 0.6 * next());
  const thickness = Array.from({ length: n }, () => 10 + 50 * next());
  const wpg = density.map((g, i) => 180 - 150 * g - 0.4 * (thickness[i] as number) + 8 * (next() - 0.5));
  const rows = density.map((g, i) => [g, thickness[i] as number]);
  return { density, wpg, rows };
}

for (const n of [10_000, 100_000]) {
  const { density, wpg, rows } = study(n);
  const half = n / 2;
  describe(`domain statistics on ${n} rows`, () => {
    bench('summarize', () => {
      summarize(wpg);
    });
    bench(`welchTest (two groups of ${half})`, () => {
      welchTest(wpg.slice(0, half), wpg.slice(half));
    });
    bench('fitLinear (WPG ~ density)', () => {
      fitLinear(density, wpg);
    });
    bench('fitMultiple (WPG ~ density + thickness)', () => {
      fitMultiple(rows, wpg);
    });
  });
}
