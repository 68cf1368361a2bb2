import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { runResponseSchema, type RecordStageInput } from '../../../../shared/schemas/runs';
import { runKeys } from './runs-queries';

/** Starts a stage, or changes a recorded one (its end time, readings, oven temperatures). */
export function useRecordStage(runId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: async (input: RecordStageInput) => (await api.post(`/runs/${runId}/stages`, input, runResponseSchema)).run,
    onSuccess: (run) => {
      qc.setQueryData(runKeys.detail(run.id), run);
      return qc.invalidateQueries({ queryKey: runKeys.all });
    },
  });
}
