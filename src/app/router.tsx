import type { QueryClient } from '@tanstack/react-query';
import { createBrowserRouter, Navigate, Outlet, type LoaderFunctionArgs, type RouteObject } from 'react-router-dom';
import { roleAtLeast, type Role } from '../../shared/constants/roles';
import { paths } from '../config/paths';
import { Loading } from '../components/ui/page';
import { RouteError } from '../components/ui/route-error';
import { meQuery } from '../lib/session';
import type { ScreenModule } from '../lib/routing';
import { RequireRole } from './require-role';
import { NotFoundScreen } from './routes/not-found';

type Load = () => Promise<ScreenModule>;

/**
 * One screen: its code is a separate chunk, fetched on first visit; its loader starts the screen's reads
 * (the module's `prefetch`, with the screen's own query factories) once the session is known and the
 * role may see the screen; any error while loading or rendering shows the shared error element.
 */
function screen(qc: QueryClient, path: string, load: Load, min?: Role): RouteObject {
  return {
    path,
    ErrorBoundary: RouteError,
    loader: async ({ params, request }: LoaderFunctionArgs) => {
      const module = await load();
      if (!module.prefetch) return null;
      const me = await qc.ensureQueryData(meQuery());
      if (me && (!min || roleAtLeast(me.role, min))) module.prefetch(qc, { params, url: new URL(request.url) });
      return null;
    },
    lazy: async () => {
      const { Component } = await load();
      if (!min) return { Component };
      return {
        Component: () => (
          <RequireRole min={min}>
            <Component />
          </RequireRole>
        ),
      };
    },
  };
}

/** Every screen of the app. Features provide the route modules; only this file composes them. */
export function appRoutes(qc: QueryClient): RouteObject[] {
  const s = (path: string, load: Load, min?: Role) => screen(qc, path, load, min);
  return [
    {
      // Shown while the first screen's code and the session load.
      HydrateFallback: () => <Loading />,
      ErrorBoundary: RouteError,
      element: <Outlet />,
      children: [
        s(paths.signIn.path, () => import('../features/auth/routes/sign-in-route')),
        s(paths.forgotPassword.path, () => import('../features/auth/routes/forgot-password-route')),
        s(paths.resetPassword.path, () => import('../features/auth/routes/reset-password-route')),
        s(paths.acceptInvitation.path, () => import('../features/auth/routes/accept-invitation-route')),
        {
          // The signed-in frame is a chunk of its own too: the sign-in page does not need it.
          lazy: async () => ({ Component: (await import('./layout')).AppLayout }),
          ErrorBoundary: RouteError,
          loader: () => qc.ensureQueryData(meQuery()),
          children: [
            s(paths.bench.path, () => import('../features/runs/routes/bench-route')),
            s(paths.runs.path, () => import('../features/runs/routes/runs-route')),
            s(paths.runNew.path, () => import('../features/runs/routes/new-run-route'), 'technician'),
            s(paths.run.path, () => import('../features/runs/routes/run-route')),
            s(paths.runCoupons.path, () => import('../features/coupons/routes/run-coupons-route')),
            s(paths.coupons.path, () => import('../features/coupons/routes/coupons-route')),
            s(paths.coupon.path, () => import('../features/coupons/routes/coupon-route')),
            s(paths.trials.path, () => import('../features/trials/routes/trials-route')),
            s(paths.trialNew.path, () => import('../features/trials/routes/new-trial-route'), 'technician'),
            s(paths.trial.path, () => import('../features/trials/routes/trial-route')),
            s(paths.trialEdit.path, () => import('../features/trials/routes/trial-edit-route'), 'technician'),
            s(paths.trialLabels.path, () => import('../features/trials/routes/labels-route')),
            s(paths.trialCoupons.path, () => import('../features/coupons/routes/trial-coupons-route')),
            s(paths.reference.path, () => import('../features/reference/routes/reference-route')),
            // Viewers read the history; the screen offers uploads to technicians and above.
            s(paths.imports.path, () => import('../features/imports/routes/imports-route')),
            s(paths.import.path, () => import('../features/imports/routes/import-route')),
            s(paths.compare.path, () => import('../features/analysis/routes/compare-route')),
            s(paths.compareView.path, () => import('../features/analysis/routes/evidence-route')),
            s(paths.findings.path, () => import('../features/findings/routes/findings-route')),
            s(paths.findingNew.path, () => import('../features/findings/routes/new-finding-route'), 'technician'),
            s(paths.finding.path, () => import('../features/findings/routes/finding-route')),
            s(paths.wiki.path, () => import('../features/wiki/routes/wiki-route')),
            s(paths.wikiPage.path, () => import('../features/wiki/routes/wiki-page-route')),
            s(paths.preferences.path, () => import('../features/auth/routes/preferences-route')),
            { path: paths.admin.path, element: <Navigate to={paths.adminUsers.href()} replace /> },
            s(paths.adminUsers.path, () => import('../features/auth/routes/users-route'), 'admin'),
            s(paths.adminOutbox.path, () => import('../features/admin/routes/outbox-route'), 'admin'),
            s(paths.adminSettings.path, () => import('../features/admin/routes/settings-route'), 'admin'),
            { path: '*', element: <NotFoundScreen /> },
          ],
        },
      ],
    },
  ];
}

export function createAppRouter(qc: QueryClient) {
  return createBrowserRouter(appRoutes(qc));
}
