import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { resinLotResponseSchema, type CreateResinLotInput } from '../../../../shared/schemas/reference';
import { lotKeys, resinKeys } from './reference-queries';

/** Records a newly activated lot. */
export function useActivateLot() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateResinLotInput) => api.post('/resin-lots', input, resinLotResponseSchema),
    onSuccess: async () => {
      // Each resin counts its usable lots.
      await Promise.all([qc.invalidateQueries({ queryKey: lotKeys.all }), qc.invalidateQueries({ queryKey: resinKeys.all })]);
    },
  });
}
