import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { runResponseSchema, type UpdateRunInput } from '../../../../shared/schemas/runs';
import { runKeys } from './runs-queries';

export function useUpdateRun(runId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: async (input: UpdateRunInput) => (await api.patch(`/runs/${runId}`, input, runResponseSchema)).run,
    onSuccess: (run) => {
      qc.setQueryData(runKeys.detail(run.id), run);
      return qc.invalidateQueries({ queryKey: runKeys.all });
    },
  });
}
