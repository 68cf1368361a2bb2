import { queryOptions } from '@tanstack/react-query';
import { api, queryString } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/queries/keys';
import { runListQuery } from '../../../lib/queries/records';
import { benchResponseSchema } from '../../../../shared/schemas/runs';

// Lists and single runs are read through src/lib/queries/records.ts (other features show them too).

/** What is due across all runs; refetched every minute so the timers stay honest while the page is open. */
export const benchQuery = (withinHours = 4) =>
  queryOptions({
    queryKey: queryKeys.bench.due(withinHours),
    queryFn: () => api.get(`/bench${queryString({ withinHours })}`, benchResponseSchema),
    refetchInterval: 60_000,
  });

/** The runs the Bench shows: those in the chamber or the oven, newest first, kept fresh like the timers. */
export const runsInProgressQuery = () => queryOptions({ ...runListQuery({ status: 'in-progress', sort: '-id' }), refetchInterval: 60_000 });
