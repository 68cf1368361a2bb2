import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { createTrialCouponsResponseSchema } from '../../../../shared/schemas/trials';
import { trialKeys } from './trials-queries';

/** Creates the coupons the plan calls for that do not exist yet (safe to repeat). */
export function useCreatePlannedCoupons(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api.post(`/trials/${id}/coupons`, undefined, createTrialCouponsResponseSchema),
    onSuccess: async (res) => {
      qc.setQueryData(trialKeys.detail(id), res.trial);
      // The list counts coupons and the label sheet holds one label per coupon.
      await Promise.all([qc.invalidateQueries({ queryKey: trialKeys.lists() }), qc.invalidateQueries({ queryKey: trialKeys.labels(id) })]);
    },
  });
}
