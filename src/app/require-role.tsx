import type { ReactNode } from 'react';
import { roleAtLeast, ROLE_LABELS, type Role } from '../../shared/constants/roles';
import { Page } from '../components/ui/page';
import { useMe } from '../lib/session';

/** Hides a screen from roles that cannot use it. The server refuses them anyway; this is for clarity. */
export function RequireRole({ min, children }: { min: Role; children: ReactNode }) {
  const me = useMe();
  if (!me) return null;
  if (!roleAtLeast(me.role, min)) {
    return (
      <Page title="Not for your role">
        <p>This screen needs the {ROLE_LABELS[min]} role or higher. Ask the shop's admin if you need it.</p>
      </Page>
    );
  }
  return <>{children}</>;
}
