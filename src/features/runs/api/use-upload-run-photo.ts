import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { photoResponseSchema } from '../../../../shared/schemas/runs';
import { queryKeys } from '../../../lib/queries/keys';

export function useUploadRunPhoto(runId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (form: FormData) => api.post(`/runs/${runId}/photos`, form, photoResponseSchema),
    onSuccess: () => qc.invalidateQueries({ queryKey: queryKeys.runs.detail(runId) }),
  });
}
