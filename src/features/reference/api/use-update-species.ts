import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { speciesResponseSchema, type UpdateSpeciesInput } from '../../../../shared/schemas/reference';
import { lotKeys, speciesKeys } from './reference-queries';

export function useUpdateSpecies() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...patch }: UpdateSpeciesInput & { id: number }) => api.patch(`/species/${id}`, patch, speciesResponseSchema),
    onSuccess: async () => {
      // Lots list the species that went through them by name.
      await Promise.all([qc.invalidateQueries({ queryKey: speciesKeys.all }), qc.invalidateQueries({ queryKey: lotKeys.all })]);
    },
  });
}
