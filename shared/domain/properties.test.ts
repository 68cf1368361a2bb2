import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  absolutePressureFromGauge,
  basicSpecificGravity,
  maxMoistureContent,
  maxWeightPercentGain,
  moistureContent,
  percentVacuum,
  porosity,
  specificGravityAtMoisture,
  standardPressureAtAltitude,
  summarize,
  voidFill,
  weightPercentGain,
  welchTest,
} from './index';

// Invariants that follow from the definitions; no published source is needed beyond them.
const mass = fc.double({ min: 0.1, max: 10_000, noNaN: true });
const woodSg = fc.double({ min: 0.1, max: 1.2, noNaN: true });
const resinDensity = fc.double({ min: 0.9, max: 1.4, noNaN: true });
const moisture = fc.double({ min: 0, max: 200, noNaN: true });
const altitude = fc.double({ min: -400, max: 5000, noNaN: true });
// Measurements come with a resolution (here 0.01), so subnormal spreads such as 5e-324 are not generated.
const measurement = fc.integer({ min: -100_000_000, max: 100_000_000 }).map((v) => v / 100);
const sample = fc.array(measurement, { minLength: 2, maxLength: 50 });

describe('domain invariants (fast-check)', () => {
  it('WPG ≥ 0 whenever the later mass is not below the dry mass', () => {
    fc.assert(
      fc.property(mass, fc.double({ min: 0, max: 5, noNaN: true }), (dry, extra) => {
        expect(weightPercentGain(dry, dry * (1 + extra))).toBeGreaterThanOrEqual(0);
      }),
    );
  });

  it('maxWeightPercentGain falls as SG rises (denser wood has less void to fill)', () => {
    fc.assert(
      fc.property(woodSg, woodSg, resinDensity, (g1, g2, resin) => {
        fc.pre(Math.abs(g1 - g2) > 1e-9);
        const [lo, hi] = g1 < g2 ? [g1, g2] : [g2, g1];
        expect(maxWeightPercentGain(lo, resin)).toBeGreaterThan(maxWeightPercentGain(hi, resin));
      }),
    );
  });

  it('WPG at full void fill equals maxWeightPercentGain, and void fill is then 1', () => {
    fc.assert(
      fc.property(woodSg, resinDensity, fc.double({ min: 1, max: 1000, noNaN: true }), (g, resin, volume) => {
        const dry = g * volume;
        const cured = dry + porosity(g) * volume * resin;
        const wpg = weightPercentGain(dry, cured);
        expect(Math.abs(wpg - maxWeightPercentGain(g, resin))).toBeLessThanOrEqual(1e-9 * wpg);
        expect(voidFill(dry, cured, volume, resin)).toBeCloseTo(1, 9);
      }),
    );
  });

  it('SG adjustment and its inverse round-trip, and G_M ≥ G_b (wood shrinks as it dries)', () => {
    fc.assert(
      // Basic SG up to 1.0: beyond about 1.07 the equation's oven-dry SG reaches the cell-wall density.
      fc.property(fc.double({ min: 0.1, max: 1.0, noNaN: true }), moisture, (gb, m) => {
        // Above the maximum moisture content (every void full of water) the input is refused.
        fc.pre(m <= maxMoistureContent(gb));
        const gm = specificGravityAtMoisture(gb, m);
        expect(gm).toBeGreaterThanOrEqual(gb);
        expect(basicSpecificGravity(gm, m)).toBeCloseTo(gb, 12);
      }),
    );
  });

  it('moisture content is never negative and recovers the water added', () => {
    fc.assert(
      fc.property(mass, fc.double({ min: 0, max: 300, noNaN: true }), (od, mc) => {
        const result = moistureContent(od * (1 + mc / 100), od);
        expect(result).toBeGreaterThanOrEqual(0);
        expect(result).toBeCloseTo(mc, 8);
      }),
    );
  });

  it('pressure falls with altitude; gauge → absolute → % vacuum is consistent', () => {
    fc.assert(
      fc.property(altitude, altitude, fc.double({ min: 0, max: 1, noNaN: true }), (z1, z2, share) => {
        fc.pre(Math.abs(z1 - z2) > 1e-6);
        const [lo, hi] = z1 < z2 ? [z1, z2] : [z2, z1];
        expect(standardPressureAtAltitude(lo)).toBeGreaterThan(standardPressureAtAltitude(hi));
        const ambient = standardPressureAtAltitude(z1);
        const abs = absolutePressureFromGauge(share * ambient, z1);
        expect(percentVacuum(abs, z1)).toBeCloseTo(share * 100, 9);
      }),
    );
  });

  it('summarize: min ≤ median ≤ max, the mean inside [min, max] and inside its own 95 % CI', () => {
    fc.assert(
      fc.property(sample, (values) => {
        const s = summarize(values);
        expect(s.min).toBeLessThanOrEqual(s.median);
        expect(s.median).toBeLessThanOrEqual(s.max);
        expect(s.mean).toBeGreaterThanOrEqual(s.min - 1e-9 * Math.abs(s.min));
        expect(s.mean).toBeLessThanOrEqual(s.max + 1e-9 * Math.abs(s.max));
        expect(s.ci95[0]).toBeLessThanOrEqual(s.mean);
        expect(s.ci95[1]).toBeGreaterThanOrEqual(s.mean);
      }),
    );
  });

  it('welchTest: swapping the groups flips t and g and keeps p; 0 ≤ p ≤ 1', () => {
    fc.assert(
      fc.property(sample, sample, (a, b) => {
        fc.pre(new Set(a).size > 1 || new Set(b).size > 1);
        const ab = welchTest(a, b);
        const ba = welchTest(b, a);
        expect(ab.p).toBeGreaterThanOrEqual(0);
        expect(ab.p).toBeLessThanOrEqual(1);
        expect(ba.t).toBeCloseTo(-ab.t, 9);
        expect(ba.hedgesG).toBeCloseTo(-ab.hedgesG, 9);
        expect(ba.p).toBeCloseTo(ab.p, 12);
      }),
    );
  });
});
