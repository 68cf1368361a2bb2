/** Display unit systems a user can choose. Storage is always SI (g, mm, °C, kPa absolute). */
export const UNIT_SYSTEMS_LIST = ['metric', 'us'] as const;
export type UnitSystemName = (typeof UNIT_SYSTEMS_LIST)[number];
