import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { useInvalidate } from '../../../lib/queries/invalidate';
import {
  findingResponseSchema,
  type ApproveFindingInput,
  type CreateFindingInput,
  type Finding,
  type UpdateFindingInput,
} from '../../../../shared/schemas/findings';
import { findingKeys } from './findings-queries';

/** After any change: the finding's own entry takes the answer, and every list and wiki read refreshes. */
function useSettle() {
  const qc = useQueryClient();
  const invalidate = useInvalidate();
  return async (finding: Finding) => {
    qc.setQueryData(findingKeys.detail(finding.id), finding);
    await invalidate('findings');
  };
}

export function useCreateFinding() {
  const settle = useSettle();
  return useMutation({
    mutationFn: async (input: CreateFindingInput) => (await api.post('/findings', input, findingResponseSchema)).finding,
    onSuccess: settle,
  });
}

/** Autosave. Only the finding's own entry is updated; lists refresh when the writer leaves or submits. */
export function useSaveFinding(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: async (patch: UpdateFindingInput) => (await api.patch(`/findings/${id}`, patch, findingResponseSchema)).finding,
    onSuccess: (finding) => {
      qc.setQueryData(findingKeys.detail(id), finding);
      void qc.invalidateQueries({ queryKey: findingKeys.revisions(id) });
    },
  });
}

type Step = 'submit' | 'reopen' | 'withdraw' | 'revise';

export function useFindingStep(id: number) {
  const settle = useSettle();
  return useMutation({
    mutationFn: async (step: Step) => (await api.post(`/findings/${id}/${step}`, undefined, findingResponseSchema)).finding,
    onSuccess: settle,
  });
}

export function useComment(id: number) {
  const settle = useSettle();
  return useMutation({
    mutationFn: async (bodyMd: string) => (await api.post(`/findings/${id}/comments`, { bodyMd }, findingResponseSchema)).finding,
    onSuccess: settle,
  });
}

export function useReturnFinding(id: number) {
  const settle = useSettle();
  return useMutation({
    mutationFn: async (reason: string) => (await api.post(`/findings/${id}/return`, { reason }, findingResponseSchema)).finding,
    onSuccess: settle,
  });
}

export function useApproveFinding(id: number) {
  const settle = useSettle();
  return useMutation({
    mutationFn: async (input: ApproveFindingInput) => (await api.post(`/findings/${id}/approve`, input, findingResponseSchema)).finding,
    onSuccess: settle,
  });
}

export function useAttachEvidence(id: number) {
  const settle = useSettle();
  return useMutation({
    mutationFn: async (savedViewId: number) => (await api.post(`/findings/${id}/evidence`, { savedViewId }, findingResponseSchema)).finding,
    onSuccess: settle,
  });
}

export function useDetachEvidence(id: number) {
  const settle = useSettle();
  return useMutation({
    mutationFn: async (evidenceId: number) => (await api.delete(`/findings/${id}/evidence/${evidenceId}`, undefined, findingResponseSchema)).finding,
    onSuccess: settle,
  });
}
