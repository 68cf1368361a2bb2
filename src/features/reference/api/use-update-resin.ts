import { useMutation } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { useInvalidate } from '../../../lib/queries/invalidate';
import { resinResponseSchema, type UpdateResinInput } from '../../../../shared/schemas/reference';

export function useUpdateResin() {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: ({ id, ...patch }: UpdateResinInput & { id: number }) => api.patch(`/resins/${id}`, patch, resinResponseSchema),
    onSuccess: () => invalidate('resins'),
  });
}
