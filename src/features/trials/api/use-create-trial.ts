import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { trialResponseSchema, type CreateTrialInput } from '../../../../shared/schemas/trials';
import { trialKeys } from './trials-queries';

export function useCreateTrial() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: async (input: CreateTrialInput) => (await api.post('/trials', input, trialResponseSchema)).trial,
    onSuccess: async (trial) => {
      qc.setQueryData(trialKeys.detail(trial.id), trial);
      await qc.invalidateQueries({ queryKey: trialKeys.lists() });
    },
  });
}
