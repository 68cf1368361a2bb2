import type { RouteObject } from 'react-router-dom';
import { LaterRelease, Page } from '../../components/ui/page';

// Bench, runs and coupons screens.
export const benchRoutes: RouteObject[] = [
  { path: '/', element: <Page title="Bench"><LaterRelease what="Today's work: runs in progress, what is due next, coupons waiting for a weighing." /></Page> },
  { path: '/runs', element: <Page title="Runs"><LaterRelease what="The chamber log with stage timeline, gauge readings and rule checks." /></Page> },
  { path: '/coupons', element: <Page title="Coupons"><LaterRelease what="The measurement entry grid with live computed columns." /></Page> },
];
