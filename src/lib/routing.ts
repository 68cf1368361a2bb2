import type { QueryClient } from '@tanstack/react-query';
import type { ComponentType } from 'react';
import type { Params } from 'react-router-dom';

/** What a screen's prefetch is given: the route's params and the whole address (for ?filters). */
export interface PrefetchArgs {
  params: Params<string>;
  url: URL;
}

/**
 * A screen's route module (`src/features/<f>/routes/<screen>-route.tsx`), loaded lazily by the router.
 * `prefetch` starts the screen's reads with the SAME query factories the screen uses, so the data is
 * on its way while the screen's code downloads; it must not await or throw (the screen shows its own
 * loading and error states). The router gives every screen the shared error element.
 */
export interface ScreenModule {
  Component: ComponentType;
  prefetch?: (qc: QueryClient, args: PrefetchArgs) => void;
}

/** A positive integer route param, or null (the screen then says there is nothing at this address). */
export function idParam(params: Params<string>, name = 'id'): number | null {
  const n = Number(params[name]);
  return Number.isInteger(n) && n > 0 ? n : null;
}
