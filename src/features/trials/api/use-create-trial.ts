import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { trialResponseSchema, type CreateTrialInput } from '../../../../shared/schemas/trials';
import { queryKeys } from '../../../lib/queries/keys';
import { useInvalidate } from '../../../lib/queries/invalidate';

export function useCreateTrial() {
  const qc = useQueryClient();
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: async (input: CreateTrialInput) => (await api.post('/trials', input, trialResponseSchema)).trial,
    onSuccess: async (trial) => {
      qc.setQueryData(queryKeys.trials.detail(trial.id), trial);
      await invalidate('trials');
    },
  });
}
