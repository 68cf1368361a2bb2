import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { speciesResponseSchema, type CreateSpeciesInput } from '../../../../shared/schemas/reference';
import { speciesKeys } from './reference-queries';

export function useCreateSpecies() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateSpeciesInput) => api.post('/species', input, speciesResponseSchema),
    onSuccess: () => qc.invalidateQueries({ queryKey: speciesKeys.all }),
  });
}
