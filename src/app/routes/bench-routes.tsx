import type { RouteObject } from 'react-router-dom';
import { RequireRole } from '../require-role';
import { BenchScreen } from '../../features/runs/components/bench-screen';
import { NewRunScreen } from '../../features/runs/components/new-run-screen';
import { RunScreen } from '../../features/runs/components/run-screen';
import { RunsScreen } from '../../features/runs/components/runs-screen';
import { CouponScreen } from '../../features/coupons/components/coupon-screen';
import { CouponsScreen, RunCouponsScreen } from '../../features/coupons/components/coupons-screens';

// Bench, runs and coupons screens.
export const benchRoutes: RouteObject[] = [
  { path: '/', element: <BenchScreen /> },
  { path: '/runs', element: <RunsScreen /> },
  { path: '/runs/new', element: <RequireRole min="technician"><NewRunScreen /></RequireRole> },
  { path: '/runs/:id', element: <RunScreen /> },
  { path: '/runs/:id/coupons', element: <RunCouponsScreen /> },
  { path: '/coupons', element: <CouponsScreen /> },
  { path: '/coupons/:id', element: <CouponScreen /> },
];
