import { useMutation } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { useInvalidate } from '../../../lib/queries/invalidate';
import { resinResponseSchema, type CreateResinInput } from '../../../../shared/schemas/reference';

export function useCreateResin() {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: (input: CreateResinInput) => api.post('/resins', input, resinResponseSchema),
    onSuccess: () => invalidate('resins'),
  });
}
