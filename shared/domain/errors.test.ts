import { describe, expect, it } from 'vitest';
import type { DomainErrorCode } from './index';
import {
  DomainError,
  absolutePressureFromGauge,
  antiSwellEfficiency,
  basicSpecificGravity,
  cureLoss,
  densityAtMoisture,
  equilibriumMoistureContent,
  fitLinear,
  fitMultiple,
  hardnessGain,
  maxWeightPercentGain,
  moistureContent,
  percentVacuum,
  porosity,
  reachedConstantMass,
  resinLoading,
  specificGravityAtMoisture,
  standardPressureAtAltitude,
  summarize,
  voidFill,
  volumetricChange,
  weightPercentGain,
  welchTest,
} from './index';
import { DOMAIN_ERROR_CODES } from './errors';

const criteria = { minIntervalHours: 2, maxChangePct: 0.1 };
const xs = [1, 2, 3, 4];

// [what is refused, call, code, field]: impossible input is refused with a machine code and the argument's name.
const cases: [string, () => unknown, DomainErrorCode, string][] = [
  // not-finite: NaN or ±Infinity anywhere
  ['NaN mass', () => moistureContent(Number.NaN, 100), 'not-finite', 'massG'],
  ['Infinity oven-dry mass', () => moistureContent(100, Infinity), 'not-finite', 'ovenDryMassG'],
  ['NaN basic SG', () => specificGravityAtMoisture(Number.NaN, 12), 'not-finite', 'basicSg'],
  ['NaN temperature', () => equilibriumMoistureContent(Number.NaN, 50), 'not-finite', 'tempC'],
  ['NaN RH', () => equilibriumMoistureContent(20, Number.NaN), 'not-finite', 'relativeHumidityPct'],
  ['−Infinity altitude', () => standardPressureAtAltitude(-Infinity), 'not-finite', 'altitudeM'],
  ['NaN gauge', () => absolutePressureFromGauge(Number.NaN, 0), 'not-finite', 'gaugeVacuumKpa'],
  ['NaN absolute', () => percentVacuum(Number.NaN, 0), 'not-finite', 'absoluteKpa'],
  ['NaN swelling', () => antiSwellEfficiency(10, Number.NaN), 'not-finite', 'swellingTreatedPct'],
  ['NaN in values', () => summarize([1, Number.NaN, 3]), 'not-finite', 'values'],
  ['Infinity in group b', () => welchTest([1, 2], [1, Infinity]), 'not-finite', 'b'],
  ['NaN in x', () => fitLinear([1, Number.NaN, 3], [1, 2, 3]), 'not-finite', 'x'],
  ['NaN in y', () => fitLinear([1, 2, 3], [1, 2, Number.NaN]), 'not-finite', 'y'],
  ['NaN in a row', () => fitMultiple([[1], [2], [Number.NaN], [4]], xs), 'not-finite', 'rows'],
  ['NaN option', () => reachedConstantMass([], { minIntervalHours: Number.NaN, maxChangePct: 0.1 }), 'not-finite', 'minIntervalHours'],
  ['NaN reading mass', () => reachedConstantMass([{ at: new Date(0), massG: Number.NaN }], criteria), 'not-finite', 'readings'],
  // non-positive-mass
  ['zero mass', () => moistureContent(0, 100), 'non-positive-mass', 'massG'],
  ['negative oven-dry mass', () => moistureContent(100, -1), 'non-positive-mass', 'ovenDryMassG'],
  ['zero dry mass (WPG)', () => weightPercentGain(0, 10), 'non-positive-mass', 'dryMassG'],
  ['negative later mass (WPG)', () => weightPercentGain(10, -1), 'non-positive-mass', 'laterMassG'],
  ['zero cured mass (loading)', () => resinLoading(10, 0, 10), 'non-positive-mass', 'curedMassG'],
  ['zero soaked mass', () => cureLoss(10, 0, 10), 'non-positive-mass', 'soakedMassG'],
  ['zero reading mass', () => reachedConstantMass([{ at: new Date(0), massG: 0 }], criteria), 'non-positive-mass', 'readings'],
  // mass-below-dry: impossible for an oven-dry basis and for anything that gained resin
  ['mass below oven-dry', () => moistureContent(99, 100), 'mass-below-dry', 'massG'],
  ['cured below dry (loading)', () => resinLoading(100, 99, 100), 'mass-below-dry', 'curedMassG'],
  ['cured below dry (void fill)', () => voidFill(50, 49, 100, 1.1), 'mass-below-dry', 'curedMassG'],
  ['cured below dry (cure loss)', () => cureLoss(100, 150, 99), 'mass-below-dry', 'curedMassG'],
  // cure-loss specific
  ['soaked not above dry', () => cureLoss(100, 100, 100), 'no-uptake', 'soakedMassG'],
  ['cured above soaked', () => cureLoss(100, 150, 151), 'mass-above-soaked', 'curedMassG'],
  // volumes and densities
  ['zero dry volume', () => resinLoading(10, 12, 0), 'non-positive-volume', 'dryVolumeCm3'],
  ['negative volume before', () => volumetricChange(-1, 10), 'non-positive-volume', 'volumeBefore'],
  ['zero volume after', () => volumetricChange(10, 0), 'non-positive-volume', 'volumeAfter'],
  ['zero resin density', () => maxWeightPercentGain(0.5, 0), 'non-positive-density', 'resinDensityGcm3'],
  ['zero cured resin density', () => voidFill(50, 60, 100, 0), 'non-positive-density', 'curedResinDensityGcm3'],
  ['negative cell-wall density', () => porosity(0.5, -1.5), 'non-positive-density', 'cellWallDensity'],
  // specific gravity and moisture ranges
  ['zero SG', () => porosity(0), 'sg-out-of-range', 'ovenDrySg'],
  ['SG at cell-wall density', () => maxWeightPercentGain(1.5, 1.1), 'sg-out-of-range', 'ovenDrySg'],
  ['piece denser than cell wall', () => voidFill(160, 170, 100, 1.1), 'sg-out-of-range', 'dryMassG'],
  ['negative basic SG', () => densityAtMoisture(-0.5, 12), 'sg-out-of-range', 'basicSg'],
  ['SG at moisture ≥ 1.5', () => basicSpecificGravity(1.6, 12), 'sg-out-of-range', 'sgAtMoisture'],
  ['negative MC', () => specificGravityAtMoisture(0.5, -1), 'moisture-out-of-range', 'moisturePct'],
  // EMC
  ['RH below 0', () => equilibriumMoistureContent(20, -0.1), 'rh-out-of-range', 'relativeHumidityPct'],
  ['RH above 100', () => equilibriumMoistureContent(20, 100.1), 'rh-out-of-range', 'relativeHumidityPct'],
  ['below the EMC table', () => equilibriumMoistureContent(-10, 50), 'temperature-out-of-range', 'tempC'],
  ['above the EMC table', () => equilibriumMoistureContent(140, 50), 'temperature-out-of-range', 'tempC'],
  // pressure
  ['above the troposphere', () => standardPressureAtAltitude(12000), 'altitude-out-of-range', 'altitudeM'],
  ['below −5 km', () => standardPressureAtAltitude(-6000), 'altitude-out-of-range', 'altitudeM'],
  ['negative gauge vacuum', () => absolutePressureFromGauge(-1, 0), 'negative-pressure', 'gaugeVacuumKpa'],
  ['negative absolute pressure', () => percentVacuum(-0.1, 0), 'negative-pressure', 'absoluteKpa'],
  ['gauge 5 % beyond sea-level ambient', () => absolutePressureFromGauge(106.5, 0), 'vacuum-exceeds-ambient', 'gaugeVacuumKpa'],
  ['barometer reading outside 50–110 kPa', () => absolutePressureFromGauge(50, 0, 20), 'pressure-out-of-range', 'barometerKpa'],
  ['gauge above ambient at 1500 m', () => absolutePressureFromGauge(90, 1500), 'vacuum-exceeds-ambient', 'gaugeVacuumKpa'],
  // other non-positive values
  ['control did not swell', () => antiSwellEfficiency(0, 5), 'non-positive-value', 'swellingControlPct'],
  ['zero hardness, control', () => hardnessGain([1000], [0]), 'non-positive-value', 'control'],
  ['negative hardness, treated', () => hardnessGain([-1], [1000]), 'non-positive-value', 'treated'],
  // drying
  ['negative interval', () => reachedConstantMass([], { minIntervalHours: -1, maxChangePct: 0.1 }), 'negative-value', 'minIntervalHours'],
  ['negative change', () => reachedConstantMass([], { minIntervalHours: 2, maxChangePct: -0.1 }), 'negative-value', 'maxChangePct'],
  ['unparseable time', () => reachedConstantMass([{ at: 'yesterday-ish', massG: 100 }], criteria), 'invalid-date', 'readings'],
  ['invalid Date', () => reachedConstantMass([{ at: new Date(Number.NaN), massG: 100 }], criteria), 'invalid-date', 'readings'],
  // fewer points than needed
  ['one value to summarize', () => summarize([1]), 'too-few-points', 'values'],
  ['no values to summarize', () => summarize([]), 'too-few-points', 'values'],
  ['one value in group a', () => welchTest([1], [1, 2]), 'too-few-points', 'a'],
  ['one value in group b', () => welchTest([1, 2], [1]), 'too-few-points', 'b'],
  ['two points for a line', () => fitLinear([1, 2], [1, 2]), 'too-few-points', 'x'],
  ['no rows', () => fitMultiple([], []), 'too-few-points', 'rows'],
  ['empty rows', () => fitMultiple([[], [], []], [1, 2, 3]), 'too-few-points', 'rows'],
  [
    'three rows for two predictors',
    () =>
      fitMultiple(
        [
          [1, 2],
          [2, 1],
          [3, 5],
        ],
        [1, 2, 3],
      ),
    'too-few-points',
    'rows',
  ],
  ['no hardness values', () => hardnessGain([], [1000]), 'too-few-points', 'treated'],
  // shapes
  ['x and y of different length', () => fitLinear([1, 2, 3], [1, 2]), 'length-mismatch', 'y'],
  ['ragged rows', () => fitMultiple([[1, 2], [2, 1], [3], [4, 4]], xs), 'length-mismatch', 'rows'],
  ['rows and y of different length', () => fitMultiple([[1], [2], [3], [4]], [1, 2, 3]), 'length-mismatch', 'y'],
  // degenerate data
  ['constant x', () => fitLinear([2, 2, 2], [1, 2, 3]), 'no-variation', 'x'],
  ['constant y (line)', () => fitLinear([1, 2, 3], [5, 5, 5]), 'no-variation', 'y'],
  ['constant y (multiple)', () => fitMultiple([[1], [2], [3], [4]], [5, 5, 5, 5]), 'no-variation', 'y'],
  ['both groups without spread', () => welchTest([3, 3], [4, 4, 4]), 'no-variation', 'a'],
  [
    'constant predictor',
    () =>
      fitMultiple(
        [
          [1, 7],
          [2, 7],
          [3, 7],
          [4, 7],
        ],
        [1, 3, 2, 5],
      ),
    'rank-deficient',
    'rows',
  ],
  [
    'collinear predictors',
    () =>
      fitMultiple(
        [
          [1, 2],
          [2, 4],
          [3, 6],
          [4, 8],
          [5, 10],
        ],
        [1, 3, 2, 5, 4],
      ),
    'rank-deficient',
    'rows',
  ],
];

describe('DomainError: every refusal carries a machine code and the offending field', () => {
  it.each(cases)('%s → %s on %s', (_what, call, code, field) => {
    let thrown: unknown;
    try {
      call();
    } catch (error) {
      thrown = error;
    }
    expect(thrown).toBeInstanceOf(DomainError);
    expect(thrown).toMatchObject({ name: 'DomainError', code, field });
    expect((thrown as DomainError).message.length).toBeGreaterThan(0);
  });

  it('every code in the union is exercised by at least one case above', () => {
    const used = new Set(cases.map(([, , code]) => code));
    expect(DOMAIN_ERROR_CODES.filter((c) => !used.has(c))).toEqual([]);
  });

  it('names the element for array arguments', () => {
    expect(() => summarize([1, 2, Number.NaN])).toThrow(expect.objectContaining({ field: 'values', index: 2 }));
  });

  it('does not refuse merely unusual values: a 100 % full vacuum, RH 100, MC above FSP, negative WPG', () => {
    expect(absolutePressureFromGauge(101.325, 0)).toBe(0);
    expect(equilibriumMoistureContent(20, 100)).toBeGreaterThan(25);
    expect(densityAtMoisture(0.5, 120)).toBeCloseTo(1100, 10);
    expect(weightPercentGain(100, 95)).toBeCloseTo(-5, 12);
  });
});
