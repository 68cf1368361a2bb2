import { describe, expect, it } from 'vitest';
import { convertTemperature } from '../units';
import {
  DEFAULT_CELL_WALL_DENSITY,
  antiSwellEfficiency,
  cureLoss,
  hardnessGain,
  maxWeightPercentGain,
  porosity,
  resinLoading,
  specificGravityAtMoisture,
  voidFill,
  volumetricChange,
  weightPercentGain,
} from './index';
import { CURE_TEMPERATURE_RANGE_C, CURE_TEMPERATURE_RANGE_F, minimumSoakHours } from './rules-of-thumb';

describe('porosity (Siau, Transport Processes in Wood, ch. 2: φ = 1 − G_od/ρ_cw)', () => {
  // [oven-dry SG, cell-wall density, φ, source]
  const rows: [number, number, number, string][] = [
    [specificGravityAtMoisture(0.56, 0), 1.5, 0.5616, 'G_b 0.56 → G_0 0.6576 (Wood Handbook ch. 4 eq.), by hand 1 − 0.6576/1.5'],
    [specificGravityAtMoisture(0.56, 0), 1.54, 0.573, 'same wood with the handbook cell-wall SG 1.54 (from memory), by hand'],
    [specificGravityAtMoisture(0.38, 0), 1.5, 0.7183, 'G_b 0.38 → G_0 0.38/0.8993 = 0.4226, by hand 1 − 0.4226/1.5'],
    [0.75, 1.5, 0.5, 'by hand: half the volume is cell wall'],
  ];
  it.each(rows)('G_od %d, ρ_cw %d → φ %d  (%s)', (g, cw, phi) => {
    expect(porosity(g, cw)).toBeCloseTo(phi, 3);
  });

  it('uses 1.5 g/cm³ by default (customary round value for cell-wall substance)', () => {
    expect(DEFAULT_CELL_WALL_DENSITY).toBe(1.5);
    expect(porosity(0.6)).toBe(porosity(0.6, 1.5));
  });
});

describe('maxWeightPercentGain, weightPercentGain and their identity', () => {
  // [oven-dry SG, resin g/cm³, cell wall, max WPG %, source]
  const maxRows: [number, number, number, number, string][] = [
    [0.5, 1.1, 1.5, 146.6667, 'by hand: (1/0.5 − 1/1.5)·1.1·100 = 1.3333·110'],
    [0.75, 1.0, 1.5, 66.6667, 'by hand: (1.3333 − 0.6667)·100'],
    [0.4, 1.15, 1.5, 210.8333, 'by hand: (2.5 − 0.6667)·115'],
  ];
  it.each(maxRows)('G_od %d, resin %d, ρ_cw %d → max WPG %d  (%s)', (g, resin, cw, expected) => {
    expect(maxWeightPercentGain(g, resin, cw)).toBeCloseTo(expected, 3);
  });

  // [dry g, later g, WPG %, source]
  const wpgRows: [number, number, number, string][] = [
    [100, 130, 30, 'definition (Rowell, Handbook of Wood Chemistry and Wood Composites); by hand'],
    [80, 80, 0, 'no gain'],
    [42.5, 97.75, 130, 'by hand 55.25/42.5'],
    [100, 98, -2, 'mass loss is reported as a negative gain'],
  ];
  it.each(wpgRows)('dry %d g, later %d g → WPG %d  (%s)', (dry, later, wpg) => {
    expect(weightPercentGain(dry, later)).toBeCloseTo(wpg, 10);
  });

  it.each([
    [0.35, 1.1],
    [0.5, 1.05],
    [0.9, 1.2],
  ])('WPG at full void fill equals maxWeightPercentGain (G_od %d, resin %d; follows from the definitions)', (g, resin) => {
    const volume = 100;
    const dry = g * volume;
    const cured = dry + porosity(g) * volume * resin;
    expect(weightPercentGain(dry, cured)).toBeCloseTo(maxWeightPercentGain(g, resin), 10);
    expect(voidFill(dry, cured, volume, resin)).toBeCloseTo(1, 12);
  });
});

describe('resinLoading, voidFill, cureLoss, volumetricChange, antiSwellEfficiency, hardnessGain', () => {
  it.each([
    [50, 80, 100, 300, 'by hand: 30 g / 100 cm³ = 0.3 g/cm³ = 300 kg/m³ (retention convention)'],
    [120, 120, 200, 0, 'no uptake'],
  ])('resinLoading(%d g, %d g, %d cm³) → %d kg/m³  (%s)', (dry, cured, v, expected) => {
    expect(resinLoading(dry, cured, v)).toBeCloseTo(expected, 10);
  });

  it('voidFill: 30 g of resin at 1.1 g/cm³ in 100 cm³ of SG 0.5 wood fills 27.27 of 66.67 cm³ of voids (by hand)', () => {
    expect(voidFill(50, 80, 100, 1.1)).toBeCloseTo(27.2727 / 66.6667, 4);
  });

  it.each([
    [100, 180, 170, 12.5, 'by hand: 10 g lost of 80 g soaked in'],
    [100, 180, 180, 0, 'nothing lost'],
    [100, 180, 100, 100, 'everything lost'],
  ])('cureLoss(%d, %d, %d) → %d  (%s)', (dry, soaked, cured, expected) => {
    expect(cureLoss(dry, soaked, cured)).toBeCloseTo(expected, 10);
  });

  it.each([
    [100, 105, 5, 'bulking by hand (Rowell & Ellis 1978 definition)'],
    [20, 22.6, 13, 'swelling by hand 2.6/20'],
    [100, 95, -5, 'shrinkage is a negative change'],
  ])('volumetricChange(%d, %d) → %d  (%s)', (before, after, expected) => {
    expect(volumetricChange(before, after)).toBeCloseTo(expected, 10);
  });

  it.each([
    [12, 3, 75, 'by hand (Rowell & Ellis 1978 definition)'],
    [12, 12, 0, 'no improvement'],
    [10, 12, -20, 'treated swelled more'],
  ])('antiSwellEfficiency(%d, %d) → %d  (%s)', (control, treated, expected) => {
    expect(antiSwellEfficiency(control, treated)).toBeCloseTo(expected, 10);
  });

  it('hardnessGain is mean treated / mean control (by hand 2100/1050 = 2)', () => {
    expect(hardnessGain([2000, 2200], [1000, 1100])).toBeCloseTo(2, 12);
  });
});

describe('rules of thumb of the trade (common practice, no published source)', () => {
  it('soak at least twice the vacuum time: a 4–6 h vacuum means an 8–12 h (overnight) soak', () => {
    expect(minimumSoakHours(4)).toBe(8);
    expect(minimumSoakHours(6)).toBe(12);
  });

  it('the cure window is the 200–250 °F of shop practice, in °C without rounding (°F = °C × 9/5 + 32)', () => {
    const [lowF, highF] = CURE_TEMPERATURE_RANGE_F;
    const [lowC, highC] = CURE_TEMPERATURE_RANGE_C;
    // An oven typed as 200 or 250 °F is stored as exactly these ends.
    expect(convertTemperature(lowF, 'degF', 'degC')).toBe(lowC);
    expect(convertTemperature(highF, 'degF', 'degC')).toBe(highC);
    expect(lowC).toBeCloseTo(93.3333333, 6);
    expect(highC).toBeCloseTo(121.1111111, 6);
  });
});
