import { useMutation } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { useInvalidate } from '../../../lib/queries/invalidate';
import { speciesResponseSchema, type CreateSpeciesInput } from '../../../../shared/schemas/reference';

export function useCreateSpecies() {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: (input: CreateSpeciesInput) => api.post('/species', input, speciesResponseSchema),
    onSuccess: () => invalidate('species'),
  });
}
