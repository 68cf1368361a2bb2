import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { trialResponseSchema, type UpdateTrialInput } from '../../../../shared/schemas/trials';
import { trialKeys } from './trials-queries';

export function useUpdateTrial(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: async (patch: UpdateTrialInput) => (await api.patch(`/trials/${id}`, patch, trialResponseSchema)).trial,
    onSuccess: async (trial) => {
      qc.setQueryData(trialKeys.detail(id), trial);
      await Promise.all([qc.invalidateQueries({ queryKey: trialKeys.lists() }), qc.invalidateQueries({ queryKey: trialKeys.labels(id) })]);
    },
  });
}
