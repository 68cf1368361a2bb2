import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { runResponseSchema, type RecordStageInput } from '../../../../shared/schemas/runs';
import { queryKeys } from '../../../lib/queries/keys';
import { useInvalidate } from '../../../lib/queries/invalidate';

/** Starts a stage, or changes a recorded one (its end time, readings, oven temperatures). */
export function useRecordStage(runId: number) {
  const qc = useQueryClient();
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: async (input: RecordStageInput) => (await api.post(`/runs/${runId}/stages`, input, runResponseSchema)).run,
    onSuccess: (run) => {
      qc.setQueryData(queryKeys.runs.detail(run.id), run);
      return invalidate('runs');
    },
  });
}
