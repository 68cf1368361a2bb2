import { useMutation } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { useInvalidate } from '../../../lib/queries/invalidate';
import { resinLotResponseSchema, type UpdateResinLotInput } from '../../../../shared/schemas/reference';

export function useUpdateLot() {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: ({ id, ...patch }: UpdateResinLotInput & { id: number }) => api.patch(`/resin-lots/${id}`, patch, resinLotResponseSchema),
    onSuccess: () => invalidate('lots'),
  });
}
