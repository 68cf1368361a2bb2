import type { RouteObject } from 'react-router-dom';
import { RequireRole } from '../require-role';
import { ReferenceScreen } from '../../features/reference/components/reference-screen';
import { LabelSheetScreen } from '../../features/trials/components/label-sheet-screen';
import { TrialEditPlanScreen, TrialPlanScreen } from '../../features/trials/components/trial-plan-screen';
import { TrialScreen } from '../../features/trials/components/trial-screen';
import { TrialsScreen } from '../../features/trials/components/trials-screen';

// Reference (species, resins, lots) and trials screens.
export const planRoutes: RouteObject[] = [
  { path: '/trials', element: <TrialsScreen /> },
  { path: '/trials/new', element: <RequireRole min="technician"><TrialPlanScreen /></RequireRole> },
  { path: '/trials/:id', element: <TrialScreen /> },
  { path: '/trials/:id/edit', element: <RequireRole min="technician"><TrialEditPlanScreen /></RequireRole> },
  { path: '/trials/:id/labels', element: <LabelSheetScreen /> },
  { path: '/reference', element: <ReferenceScreen /> },
];
