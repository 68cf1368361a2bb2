import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { useInvalidate } from '../../../lib/queries/invalidate';
import {
  importDetailSchema,
  importSampleResponseSchema,
  importPresetResponseSchema,
  type CommitImportInput,
  type ImportFormat,
  type ImportMapping,
} from '../../../../shared/schemas/imports';
import { importKeys } from './imports-queries';

/** Re-reads the head of the file with other format choices. */
export function useSample(id: number) {
  return useMutation({ mutationFn: (format: ImportFormat) => api.post(`/imports/${id}/sample`, { format }, importSampleResponseSchema) });
}

function useJob(id: number, path: 'preview' | 'commit') {
  const qc = useQueryClient();
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: (body: { mapping: ImportMapping } & Partial<Omit<CommitImportInput, 'mapping'>>) =>
      api.post(`/imports/${id}/${path}`, body, importDetailSchema),
    onSuccess: (d) => {
      qc.setQueryData(importKeys.detail(id), d);
      void invalidate('imports');
    },
  });
}

export const usePreview = (id: number) => useJob(id, 'preview');
export const useCommit = (id: number) => useJob(id, 'commit');

export function useUndo(id: number) {
  const qc = useQueryClient();
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: (reason: string) => api.post(`/imports/${id}/undo`, { reason }, importDetailSchema),
    onSuccess: (d) => {
      qc.setQueryData(importKeys.detail(id), d);
      void invalidate('imports');
    },
  });
}

export function useSavePreset(importId: number) {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: (v: { name: string; mapping: ImportMapping }) => api.post('/imports/presets', { ...v, importId }, importPresetResponseSchema),
    onSuccess: () => invalidate('imports'),
  });
}
