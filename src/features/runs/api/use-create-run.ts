import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { runResponseSchema, type CreateRunInput } from '../../../../shared/schemas/runs';
import { queryKeys } from '../../../lib/queries/keys';
import { useInvalidate } from '../../../lib/queries/invalidate';

export function useCreateRun() {
  const qc = useQueryClient();
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: async (input: CreateRunInput) => (await api.post('/runs', input, runResponseSchema)).run,
    onSuccess: (run) => {
      qc.setQueryData(queryKeys.runs.detail(run.id), run);
      return invalidate('runs');
    },
  });
}
