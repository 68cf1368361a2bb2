import { QueryClient } from '@tanstack/react-query';
import { ApiError } from '../lib/api-client';

/** One client per page load (tests make their own): the router's prefetches and the screens share it. */
export function createQueryClient(): QueryClient {
  return new QueryClient({
    defaultOptions: {
      queries: {
        // A 4xx will not get better by asking again.
        retry: (count, err) => !(err instanceof ApiError && err.status >= 400 && err.status < 500) && count < 2,
        refetchOnWindowFocus: false,
      },
    },
  });
}
