import type { RouteObject } from 'react-router-dom';
import { LaterRelease, Page } from '../../components/ui/page';

// Reference (species, resins, lots) and trials screens.
export const planRoutes: RouteObject[] = [
  { path: '/trials', element: <Page title="Trials"><LaterRelease what="Plan trials with a conditions grid, controls and coupons per condition." /></Page> },
  { path: '/reference', element: <Page title="Reference"><LaterRelease what="Species and resins with their sources; resin lots." /></Page> },
];
