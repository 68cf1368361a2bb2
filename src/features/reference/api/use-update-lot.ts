import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { resinLotResponseSchema, type UpdateResinLotInput } from '../../../../shared/schemas/reference';
import { lotKeys, resinKeys } from './reference-queries';

export function useUpdateLot() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...patch }: UpdateResinLotInput & { id: number }) => api.patch(`/resin-lots/${id}`, patch, resinLotResponseSchema),
    onSuccess: async () => {
      await Promise.all([qc.invalidateQueries({ queryKey: lotKeys.all }), qc.invalidateQueries({ queryKey: resinKeys.all })]);
    },
  });
}
