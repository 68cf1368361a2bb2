import { useQuery } from '@tanstack/react-query';
import { NavLink, Navigate, Outlet, useLocation, useNavigate } from 'react-router-dom';
import { roleAtLeast, ROLE_LABELS } from '../../shared/constants/roles';
import { NAVIGATION } from '../config/navigation';
import { meQuery } from '../lib/session';
import { useSignOut } from '../features/auth/api/use-auth-mutations';
import { Loading } from '../components/ui/page';
import { settingsQuery } from '../lib/queries/settings';
import { paths } from '../config/paths';

/** The signed-in frame: skip link, role-aware navigation, the user's menu, and the screen. */
export function AppLayout() {
  const me = useQuery(meQuery());
  const location = useLocation();
  const navigate = useNavigate();
  const signOut = useSignOut();
  const settings = useQuery({ ...settingsQuery(), enabled: !!me.data });

  if (me.isPending) return <Loading />;
  if (!me.data) return <Navigate to={paths.signIn.href()} replace state={{ from: location.pathname + location.search }} />;
  const user = me.data;
  const items = NAVIGATION.filter((n) => roleAtLeast(user.role, n.min));

  return (
    <div className="min-h-screen">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:top-2 focus:left-2 focus:z-50 focus:rounded focus:bg-amber focus:px-3 focus:py-2 focus:text-ink">
        Skip to the content
      </a>
      <header className="no-print border-b border-rule bg-paper-deep">
        <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-3">
          <div>
            <span className="text-lg font-semibold tracking-tight">Lumenbook</span>
            {settings.data && <span className="ml-2 text-sm text-ink-faint">{settings.data.shopName}</span>}
          </div>
          <nav aria-label="Main" className="flex-1">
            <ul className="flex flex-wrap gap-1">
              {items.map((n) => (
                <li key={n.to}>
                  <NavLink
                    to={n.to}
                    end={n.to === paths.bench.href()}
                    className={({ isActive }) =>
                      `block rounded px-2 py-1 text-sm no-underline ${isActive ? 'bg-amber-light font-semibold text-ink' : 'text-ink-soft hover:bg-paper'}`
                    }
                  >
                    {n.label}
                  </NavLink>
                </li>
              ))}
            </ul>
          </nav>
          <div className="flex items-center gap-3 text-sm">
            <NavLink to={paths.preferences.href()} className="text-ink-soft">
              {user.name} · {ROLE_LABELS[user.role]}
            </NavLink>
            <button
              type="button"
              className="btn-quiet"
              onClick={async () => {
                await signOut.mutateAsync().catch(() => undefined);
                navigate(paths.signIn.href());
              }}
            >
              Sign out
            </button>
          </div>
        </div>
      </header>
      <main id="main" tabIndex={-1}>
        <Outlet />
      </main>
    </div>
  );
}
