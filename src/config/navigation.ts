import type { Role } from '../../shared/constants/roles';
import { paths } from './paths';

/** The main navigation. `min` is the least role that sees the entry; the server enforces the same. */
export const NAVIGATION: readonly { to: string; label: string; min: Role }[] = [
  { to: paths.bench.href(), label: 'Bench', min: 'viewer' },
  { to: paths.trials.href(), label: 'Trials', min: 'viewer' },
  { to: paths.runs.href(), label: 'Runs', min: 'viewer' },
  { to: paths.coupons.href(), label: 'Coupons', min: 'viewer' },
  { to: paths.imports.href(), label: 'Imports', min: 'viewer' },
  { to: paths.compare.href(), label: 'Compare', min: 'viewer' },
  { to: paths.findings.href(), label: 'Findings', min: 'viewer' },
  { to: paths.wiki.href(), label: 'Wiki', min: 'viewer' },
  { to: paths.reference.href(), label: 'Reference', min: 'viewer' },
  { to: paths.adminUsers.href(), label: 'Users', min: 'admin' },
  { to: paths.adminOutbox.href(), label: 'Outbox', min: 'admin' },
  { to: paths.adminSettings.href(), label: 'Settings', min: 'admin' },
];
