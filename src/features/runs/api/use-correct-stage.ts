import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { runHistorySchema, runResponseSchema, type CorrectStageInput } from '../../../../shared/schemas/runs';
import type { RunStage } from '../../../../shared/constants/records';
import { queryKeys } from '../../../lib/queries/keys';
import { useInvalidate } from '../../../lib/queries/invalidate';

/** Every change to a run's record and every replaced stage version, newest first. */
export const runHistoryQuery = (runId: number) =>
  queryOptions({ queryKey: queryKeys.runs.history(runId), queryFn: () => api.get(`/runs/${runId}/history`, runHistorySchema) });

/** Corrects a recorded stage with a reason; the version it replaces is kept in the run's history. */
export function useCorrectStage(runId: number, stage: RunStage) {
  const qc = useQueryClient();
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: async (input: CorrectStageInput) => (await api.post(`/runs/${runId}/stages/${stage}/corrections`, input, runResponseSchema)).run,
    onSuccess: (run) => {
      qc.setQueryData(queryKeys.runs.detail(run.id), run);
      return invalidate('runs');
    },
  });
}
