/** Display unit systems a user can choose. Storage is always SI (g, mm, °C, kPa absolute). */
export { UNIT_SYSTEMS as UNIT_SYSTEMS_LIST, type UnitSystem as UnitSystemName } from '../units';
