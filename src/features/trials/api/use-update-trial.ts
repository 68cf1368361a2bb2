import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { trialResponseSchema, type UpdateTrialInput } from '../../../../shared/schemas/trials';
import { queryKeys } from '../../../lib/queries/keys';
import { useInvalidate } from '../../../lib/queries/invalidate';

export function useUpdateTrial(id: number) {
  const qc = useQueryClient();
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: async (patch: UpdateTrialInput) => (await api.patch(`/trials/${id}`, patch, trialResponseSchema)).trial,
    onSuccess: async (trial) => {
      qc.setQueryData(queryKeys.trials.detail(id), trial);
      await invalidate('trials');
    },
  });
}
