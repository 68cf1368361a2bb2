import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { resinResponseSchema, type CreateResinInput } from '../../../../shared/schemas/reference';
import { resinKeys } from './reference-queries';

export function useCreateResin() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateResinInput) => api.post('/resins', input, resinResponseSchema),
    onSuccess: () => qc.invalidateQueries({ queryKey: resinKeys.all }),
  });
}
