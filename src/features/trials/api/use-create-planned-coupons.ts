import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { createTrialCouponsResponseSchema } from '../../../../shared/schemas/trials';
import { queryKeys } from '../../../lib/queries/keys';
import { useInvalidate } from '../../../lib/queries/invalidate';

/** Creates the coupons the plan calls for that do not exist yet (safe to repeat). */
export function useCreatePlannedCoupons(id: number) {
  const qc = useQueryClient();
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: () => api.post(`/trials/${id}/coupons`, undefined, createTrialCouponsResponseSchema),
    onSuccess: async (res) => {
      qc.setQueryData(queryKeys.trials.detail(id), res.trial);
      await invalidate('coupons');
    },
  });
}
