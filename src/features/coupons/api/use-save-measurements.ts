import { useMutation } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { batchResponseSchema, type BatchMeasurementsInput } from '../../../../shared/schemas/coupons';
import { useInvalidate } from '../../../lib/queries/invalidate';

/** The grid's save: every edited row in one request, written all together or not at all. */
export function useSaveMeasurements() {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: (input: BatchMeasurementsInput) => api.post('/coupons/measurements', input, batchResponseSchema),
    onSuccess: () => invalidate('measurements'),
  });
}
