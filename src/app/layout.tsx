import { useQuery } from '@tanstack/react-query';
import { useEffect, useState } from 'react';
import { NavLink, Navigate, Outlet, useLocation, useNavigate } from 'react-router-dom';
import { roleAtLeast, ROLE_LABELS } from '../../shared/constants/roles';
import { NAVIGATION_GROUPS } from '../config/navigation';
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
  // On a phone the navigation folds behind a Menu button; following a link folds it again.
  const [menuOpen, setMenuOpen] = useState(false);
  useEffect(() => setMenuOpen(false), [location.pathname]);

  if (me.isPending) return <Loading />;
  if (!me.data) return <Navigate to={paths.signIn.href()} replace state={{ from: location.pathname + location.search }} />;
  const user = me.data;
  const groups = NAVIGATION_GROUPS.map((g) => ({ ...g, items: g.items.filter((n) => roleAtLeast(user.role, n.min)) })).filter((g) => g.items.length > 0);

  return (
    <div className="min-h-screen">
      <a
        href="#main"
        className="sr-only focus:not-sr-only focus:absolute focus:top-2 focus:left-2 focus:z-50 focus:rounded focus:bg-amber focus:px-3 focus:py-2 focus:text-ink"
      >
        Skip to the content
      </a>
      <header className="no-print border-b border-rule bg-paper-deep">
        <div className="mx-auto max-w-6xl px-4 py-2">
          <div className="flex flex-wrap items-center gap-x-4 gap-y-1">
            <div className="min-w-0 flex-1">
              <span className="text-lg font-semibold tracking-tight">Lumenbook</span>
              {settings.data && <span className="ml-2 text-sm text-ink-faint">{settings.data.shopName}</span>}
            </div>
            <button
              type="button"
              className="btn-quiet md:hidden"
              aria-expanded={menuOpen}
              aria-controls="main-navigation"
              onClick={() => setMenuOpen((o) => !o)}
            >
              Menu
            </button>
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
          <nav id="main-navigation" aria-label="Main" className={`mt-1 ${menuOpen ? 'block' : 'hidden'} md:block`}>
            <ul className="flex flex-col gap-y-1 md:flex-row md:flex-wrap md:items-center md:gap-x-5">
              {groups.map((g, i) => (
                <li key={g.label} className={`flex flex-wrap items-center gap-1 ${i > 0 ? 'md:border-l md:border-rule md:pl-4' : ''}`}>
                  <span className="mr-1 w-full text-xs font-semibold tracking-wide text-ink-faint uppercase md:w-auto" id={`nav-group-${i}`}>
                    {g.label}
                  </span>
                  <ul className="flex flex-wrap gap-1" aria-labelledby={`nav-group-${i}`}>
                    {g.items.map((n) => (
                      <li key={n.to}>
                        <NavLink
                          to={n.to}
                          end={n.to === paths.bench.href()}
                          className={({ isActive }) =>
                            `block rounded px-2 py-1 text-sm no-underline ${i === 0 ? 'font-medium' : ''} ${isActive ? 'bg-amber-light font-semibold text-ink' : 'text-ink-soft hover:bg-paper'}`
                          }
                        >
                          {n.label}
                        </NavLink>
                      </li>
                    ))}
                  </ul>
                </li>
              ))}
            </ul>
          </nav>
        </div>
      </header>
      <main id="main" tabIndex={-1}>
        <Outlet />
      </main>
    </div>
  );
}
