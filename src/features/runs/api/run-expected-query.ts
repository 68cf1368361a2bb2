import { queryOptions } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { runExpectedSchema } from '../../../../shared/schemas/analysis';
import { queryKeys } from '../../../lib/queries/keys';

/** Each coupon's actual uptake against what the shop's history says it should have reached. */
export const runExpectedQuery = (runId: number) =>
  queryOptions({
    queryKey: [...queryKeys.runs.detail(runId), 'expected'] as const,
    queryFn: () => api.get(`/analysis/runs/${runId}/expected`, runExpectedSchema),
  });
