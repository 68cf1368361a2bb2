import type { RouteObject } from 'react-router-dom';
import { LaterRelease, Page } from '../../components/ui/page';

// Bench, trials, runs, coupons and reference screens. They are filled in by the records features.
function Pending({ title, what }: { title: string; what: string }) {
  return (
    <Page title={title}>
      <LaterRelease what={what} />
    </Page>
  );
}

export const recordRoutes: RouteObject[] = [
  { path: '/', element: <Pending title="Bench" what="Today's work: runs in progress, what is due next, coupons waiting for a weighing." /> },
  { path: '/trials', element: <Pending title="Trials" what="Plan trials with a conditions grid, controls and coupons per condition." /> },
  { path: '/runs', element: <Pending title="Runs" what="The chamber log with stage timeline, gauge readings and rule checks." /> },
  { path: '/coupons', element: <Pending title="Coupons" what="The measurement entry grid with live computed columns." /> },
  { path: '/reference', element: <Pending title="Reference" what="Species and resins with their sources; resin lots." /> },
];
