import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { batchResponseSchema, type BatchMeasurementsInput } from '../../../../shared/schemas/coupons';
import { couponKeys } from './coupons-queries';

/** The grid's save: every edited row in one request, written all together or not at all. */
export function useSaveMeasurements() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: BatchMeasurementsInput) => api.post('/coupons/measurements', input, batchResponseSchema),
    onSuccess: () => qc.invalidateQueries({ queryKey: couponKeys.all }),
  });
}
