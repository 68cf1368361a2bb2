import type { Role } from '../../shared/constants/roles';

/** The main navigation. `min` is the least role that sees the entry; the server enforces the same. */
export const NAVIGATION: readonly { to: string; label: string; min: Role }[] = [
  { to: '/', label: 'Bench', min: 'viewer' },
  { to: '/trials', label: 'Trials', min: 'viewer' },
  { to: '/runs', label: 'Runs', min: 'viewer' },
  { to: '/coupons', label: 'Coupons', min: 'viewer' },
  { to: '/imports', label: 'Imports', min: 'technician' },
  { to: '/compare', label: 'Compare', min: 'viewer' },
  { to: '/findings', label: 'Findings', min: 'viewer' },
  { to: '/wiki', label: 'Wiki', min: 'viewer' },
  { to: '/reference', label: 'Reference', min: 'viewer' },
  { to: '/admin/users', label: 'Users', min: 'admin' },
  { to: '/admin/outbox', label: 'Outbox', min: 'admin' },
  { to: '/admin/settings', label: 'Settings', min: 'admin' },
];
