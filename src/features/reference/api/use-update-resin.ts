import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { resinResponseSchema, type UpdateResinInput } from '../../../../shared/schemas/reference';
import { lotKeys, resinKeys } from './reference-queries';

export function useUpdateResin() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...patch }: UpdateResinInput & { id: number }) => api.patch(`/resins/${id}`, patch, resinResponseSchema),
    onSuccess: async () => {
      // A lot shows its resin's name and takes its shelf life from the resin.
      await Promise.all([qc.invalidateQueries({ queryKey: resinKeys.all }), qc.invalidateQueries({ queryKey: lotKeys.all })]);
    },
  });
}
