import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { runResponseSchema, type CreateRunInput } from '../../../../shared/schemas/runs';
import { runKeys } from './runs-queries';

export function useCreateRun() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: async (input: CreateRunInput) => (await api.post('/runs', input, runResponseSchema)).run,
    onSuccess: (run) => {
      qc.setQueryData(runKeys.detail(run.id), run);
      return qc.invalidateQueries({ queryKey: runKeys.all });
    },
  });
}
