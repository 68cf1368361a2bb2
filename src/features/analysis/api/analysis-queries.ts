import { keepPreviousData, queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { api, queryString } from '../../../lib/api-client';
import {
  compareResultSchema,
  evidenceListSchema,
  evidenceResponseSchema,
  overviewSchema,
  runExpectedSchema,
  sampleSizeSchema,
  type AnalysisFilters,
  type CompareRequest,
  type CreateEvidenceInput,
  type SgBasis,
} from '../../../../shared/schemas/analysis';
import { resinListSchema, speciesListSchema } from '../../../../shared/schemas/reference';
import { trialListSchema } from '../../../../shared/schemas/trials';
import { runListSchema } from '../../../../shared/schemas/runs';

export const analysisKeys = {
  all: ['analysis'] as const,
  overviews: () => [...analysisKeys.all, 'overview'] as const,
  overview: (filters: AnalysisFilters, sgBasis: SgBasis) => [...analysisKeys.overviews(), filters, sgBasis] as const,
  runExpected: (runId: number) => [...analysisKeys.all, 'run-expected', runId] as const,
  sampleSize: (q: Record<string, number | undefined>) => [...analysisKeys.all, 'sample-size', q] as const,
  choices: () => [...analysisKeys.all, 'choices'] as const,
  evidence: () => ['evidence'] as const,
  evidenceDetail: (id: number) => [...analysisKeys.evidence(), 'detail', id] as const,
  evidenceList: () => [...analysisKeys.evidence(), 'list'] as const,
};

/** Filters as query parameters: lists joined by commas, empty ones left out. */
export function filterParams(f: AnalysisFilters): Record<string, string | number | undefined> {
  const out: Record<string, string | number | undefined> = {};
  for (const [k, v] of Object.entries(f)) {
    if (v === undefined || v === null || v === '') continue;
    out[k] = Array.isArray(v) ? v.join(',') : (v as string | number);
  }
  return out;
}

export const overviewQuery = (filters: AnalysisFilters, sgBasis: SgBasis) =>
  queryOptions({
    queryKey: analysisKeys.overview(filters, sgBasis),
    queryFn: () => api.get(`/analysis/overview${queryString({ ...filterParams(filters), sgBasis })}`, overviewSchema),
    placeholderData: keepPreviousData,
  });

export const runExpectedQuery = (runId: number) =>
  queryOptions({
    queryKey: analysisKeys.runExpected(runId),
    queryFn: () => api.get(`/analysis/runs/${runId}/expected`, runExpectedSchema),
  });

export const sampleSizeQuery = (q: { speciesId?: number; resinId?: number; differencePct: number; planned?: number }) =>
  queryOptions({
    queryKey: analysisKeys.sampleSize(q),
    queryFn: () => api.get(`/analysis/sample-size${queryString(q)}`, sampleSizeSchema),
    enabled: q.differencePct > 0,
  });

export const evidenceQuery = (id: number) =>
  queryOptions({
    queryKey: analysisKeys.evidenceDetail(id),
    queryFn: () => api.get(`/evidence/${id}`, evidenceResponseSchema),
  });

export const evidenceListQuery = () =>
  queryOptions({
    queryKey: analysisKeys.evidenceList(),
    queryFn: () => api.get(`/evidence${queryString({ pageSize: 20 })}`, evidenceListSchema),
  });

// A shop's reference lists are tens of rows; one page of the largest size the API allows holds them.
export const filterChoicesQuery = () =>
  queryOptions({
    queryKey: analysisKeys.choices(),
    queryFn: async () => {
      const [species, resins, trials, runs] = await Promise.all([
        api.get(`/species${queryString({ sort: 'commonName', pageSize: 200 })}`, speciesListSchema),
        api.get(`/resins${queryString({ sort: 'name', pageSize: 200 })}`, resinListSchema),
        api.get(`/trials${queryString({ pageSize: 200 })}`, trialListSchema),
        api.get(`/runs${queryString({ pageSize: 200 })}`, runListSchema),
      ]);
      return {
        species: species.items.map((s) => ({ id: s.id, name: s.commonName })),
        resins: resins.items.map((r) => ({ id: r.id, name: r.name })),
        trials: trials.items.map((t) => ({ id: t.id, name: `${t.code} · ${t.title}` })),
        runs: runs.items.map((r) => ({ id: r.id, name: r.code })),
      };
    },
    staleTime: 60_000,
  });

/** A two-group comparison is a read with a structured body, so it is a mutation the screen triggers. */
export function useCompare() {
  return useMutation({ mutationFn: (req: CompareRequest) => api.post('/analysis/compare', req, compareResultSchema) });
}

export function useSaveEvidence() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateEvidenceInput) => api.post('/evidence', input, evidenceResponseSchema),
    onSuccess: async (res) => {
      qc.setQueryData(analysisKeys.evidenceDetail(res.evidence.id), res);
      await qc.invalidateQueries({ queryKey: analysisKeys.evidenceList() });
    },
  });
}
