import { useMutation } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { useInvalidate } from '../../../lib/queries/invalidate';
import { resinLotResponseSchema, type CreateResinLotInput } from '../../../../shared/schemas/reference';

/** Records a newly activated lot. */
export function useActivateLot() {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: (input: CreateResinLotInput) => api.post('/resin-lots', input, resinLotResponseSchema),
    onSuccess: () => invalidate('lots'),
  });
}
