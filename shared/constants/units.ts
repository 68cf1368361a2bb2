/** Display units a user can choose, per quantity, from a metric or a US preset. Storage is always SI (g, mm, °C, kPa absolute, mL, kg/m³, m, N). */
export { UNIT_SYSTEMS as UNIT_SYSTEMS_LIST, type UnitSystem as UnitSystemName } from '../units';
export {
  QUANTITIES,
  QUANTITY_LABELS,
  UNITS_OF,
  UNIT_PRESETS,
  MASS_UNITS,
  LENGTH_UNITS,
  TEMPERATURE_UNITS,
  PRESSURE_UNITS,
  VOLUME_UNITS,
  LIQUID_VOLUME_UNITS,
  DENSITY_UNITS,
  ALTITUDE_UNITS,
  FORCE_UNITS,
  type Quantity,
  type UnitPrefs,
} from '../units';
