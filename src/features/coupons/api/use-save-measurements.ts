import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { invalidate } from '../../../lib/queries/invalidate';
import { queryKeys } from '../../../lib/queries/keys';
import { replaceSaved } from '../components/save-plan';
import { batchResponseSchema, type BatchMeasurementsInput, type CouponOut } from '../../../../shared/schemas/coupons';

/**
 * The grid's save: every edited row in one request, written all together or not at all. The answer carries
 * the saved coupons, so the grids showing them are updated in place (only the changed rows) rather than
 * refetched page by page; everything else that shows measurements is refreshed.
 */
export function useSaveMeasurements() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: BatchMeasurementsInput) => api.post('/coupons/measurements', input, batchResponseSchema),
    onSuccess: (res) => {
      qc.setQueriesData<CouponOut[]>({ queryKey: [...queryKeys.coupons.all, 'grid'] }, (old) => (old ? replaceSaved(old, res.coupons) : old));
      return invalidate(qc, ['measurements'], [[...queryKeys.coupons.all, 'grid']]);
    },
  });
}
