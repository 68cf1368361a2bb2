import { createBrowserRouter, Navigate } from 'react-router-dom';
import { AppLayout } from './layout';
import { RequireRole } from './require-role';
import { FindingsLater, ImportsLater, NotFoundScreen, WikiLater } from './routes/later';
import { SignInScreen } from '../features/auth/components/sign-in-screen';
import { AcceptInvitationScreen, ForgotPasswordScreen, ResetPasswordScreen } from '../features/auth/components/password-screens';
import { UsersScreen } from '../features/auth/components/users-screen';
import { PreferencesScreen } from '../features/auth/components/preferences-screen';
import { OutboxScreen } from '../features/admin/components/outbox-screen';
import { SettingsScreen } from '../features/admin/components/settings-screen';
import { recordRoutes } from './routes/records';
import { CompareScreen } from '../features/analysis/components/compare-screen';
import { EvidenceScreen } from '../features/analysis/components/evidence-screen';

/** Every screen of the app. Features provide the components; only this file composes them. */
export const router = createBrowserRouter([
  { path: '/sign-in', element: <SignInScreen /> },
  { path: '/forgot-password', element: <ForgotPasswordScreen /> },
  { path: '/reset-password', element: <ResetPasswordScreen /> },
  { path: '/accept-invitation', element: <AcceptInvitationScreen /> },
  {
    element: <AppLayout />,
    children: [
      ...recordRoutes,
      { path: '/imports', element: <RequireRole min="technician"><ImportsLater /></RequireRole> },
      { path: '/compare', element: <CompareScreen /> },
      { path: '/compare/views/:id', element: <EvidenceScreen /> },
      { path: '/findings', element: <FindingsLater /> },
      { path: '/wiki', element: <WikiLater /> },
      { path: '/preferences', element: <PreferencesScreen /> },
      { path: '/admin', element: <Navigate to="/admin/users" replace /> },
      { path: '/admin/users', element: <RequireRole min="admin"><UsersScreen /></RequireRole> },
      { path: '/admin/outbox', element: <RequireRole min="admin"><OutboxScreen /></RequireRole> },
      { path: '/admin/settings', element: <RequireRole min="admin"><SettingsScreen /></RequireRole> },
      { path: '*', element: <NotFoundScreen /> },
    ],
  },
]);
