import type { CouponRole, TrialStatus } from '../../../../shared/constants/records';

export const TRIAL_STATUS_LABELS: Record<TrialStatus, string> = {
  planning: 'Planning',
  running: 'Running',
  analysing: 'Analysing',
  closed: 'Closed',
};
export const ROLE_LABELS: Record<CouponRole, string> = { treated: 'Treated', control: 'Control (untreated)' };
