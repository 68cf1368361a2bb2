import type { Role } from '../../shared/constants/roles';
import { paths } from './paths';

export interface NavItem {
  to: string;
  label: string;
  /** The least role that sees the entry; the server enforces the same. */
  min: Role;
}

/**
 * The main navigation in groups: the shop's everyday jobs first (today's bench work, entering coupon
 * measurements, importing a scale's file, comparing uptake, reviewing findings), then the records
 * they stand on, then the admin's tools.
 */
export const NAVIGATION_GROUPS: readonly { label: string; items: readonly NavItem[] }[] = [
  {
    label: 'Everyday',
    items: [
      { to: paths.bench.href(), label: 'Bench', min: 'viewer' },
      { to: paths.coupons.href(), label: 'Coupons', min: 'viewer' },
      { to: paths.imports.href(), label: 'Imports', min: 'viewer' },
      { to: paths.compare.href(), label: 'Compare', min: 'viewer' },
      { to: paths.findings.href(), label: 'Findings', min: 'viewer' },
    ],
  },
  {
    label: 'Records',
    items: [
      { to: paths.trials.href(), label: 'Trials', min: 'viewer' },
      { to: paths.runs.href(), label: 'Runs', min: 'viewer' },
      { to: paths.wiki.href(), label: 'Wiki', min: 'viewer' },
      { to: paths.reference.href(), label: 'Reference', min: 'viewer' },
    ],
  },
  {
    label: 'Admin',
    items: [
      { to: paths.adminUsers.href(), label: 'Users', min: 'admin' },
      { to: paths.adminOutbox.href(), label: 'Outbox', min: 'admin' },
      { to: paths.adminSettings.href(), label: 'Settings', min: 'admin' },
    ],
  },
];

/** Every entry of the main navigation, in order. */
export const NAVIGATION: readonly NavItem[] = NAVIGATION_GROUPS.flatMap((g) => g.items);
