export { DomainError } from './errors';
export type { DomainErrorCode } from './errors';
export {
  basicSpecificGravity,
  densityAtMoisture,
  equilibriumMoistureContent,
  maxMoistureContent,
  moistureContent,
  specificGravityAtMoisture,
} from './moisture';
export {
  DEFAULT_CELL_WALL_DENSITY,
  antiSwellEfficiency,
  cureLoss,
  hardnessGain,
  maxWeightPercentGain,
  porosity,
  resinLoading,
  resinWeightPercentGain,
  voidFill,
  volumetricChange,
  weightPercentGain,
} from './resin';
export {
  ALTITUDE_QUESTION_ABOVE_M,
  BAROMETER_RANGE_KPA,
  WEATHER_ALLOWANCE,
  absolutePressureFromGauge,
  altitudeQuestion,
  chamberPressure,
  percentVacuum,
  standardPressureAtAltitude,
} from './vacuum';
export type { ChamberPressure } from './vacuum';
export { reachedConstantMass } from './drying';
export type { ConstantMassCriteria, ConstantMassResult, MassReading } from './drying';
export { HEDGES_G_NOTE, summarize, welchTest } from './statistics';
export { NO_SPREAD_RELATIVE, hasSpread } from './spread';
export type { Summary, WelchResult } from './statistics';
export { fitLinear, fitMultiple, fitMultipleColumns } from './regression';
export type { LinearFit, MultipleFit } from './regression';
export {
  CURE_TEMPERATURE_RANGE_C,
  CURE_TEMPERATURE_RANGE_F,
  CURE_WINDOW_SLACK_C,
  inCureWindow,
  GAUGE_DROP_INHG_PER_1000_FT,
  SOAK_TO_VACUUM_TIME_RATIO,
  minimumSoakHours,
} from './rules-of-thumb';
