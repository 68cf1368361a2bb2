import type { LotStatus, SpeciesOrigin } from '../../../../shared/constants/records';

export const ORIGIN_LABELS: Record<SpeciesOrigin, string> = { handbook: 'Handbook', 'shop-measured': 'Shop-measured' };
export const LOT_STATUS_LABELS: Record<LotStatus, string> = { active: 'Active', retired: 'Retired', spent: 'Used up' };
