import type { RouteObject } from 'react-router-dom';
import { planRoutes } from './plan-routes';
import { benchRoutes } from './bench-routes';

/** Bench, trials, runs, coupons and reference screens. */
export const recordRoutes: RouteObject[] = [...benchRoutes, ...planRoutes];
