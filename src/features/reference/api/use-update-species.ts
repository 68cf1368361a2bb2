import { useMutation } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { useInvalidate } from '../../../lib/queries/invalidate';
import { speciesResponseSchema, type UpdateSpeciesInput } from '../../../../shared/schemas/reference';

export function useUpdateSpecies() {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: ({ id, ...patch }: UpdateSpeciesInput & { id: number }) => api.patch(`/species/${id}`, patch, speciesResponseSchema),
    onSuccess: () => invalidate('species'),
  });
}
