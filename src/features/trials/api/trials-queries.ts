import { keepPreviousData, queryOptions } from '@tanstack/react-query';
import { api, queryString } from '../../../lib/api-client';
import { resinListSchema, speciesListSchema } from '../../../../shared/schemas/reference';
import { labelSheetSchema, trialListSchema, trialResponseSchema, type TrialListQuery } from '../../../../shared/schemas/trials';

export const trialKeys = {
  all: ['trials'] as const,
  lists: () => [...trialKeys.all, 'list'] as const,
  list: (q: Partial<TrialListQuery>) => [...trialKeys.lists(), q] as const,
  detail: (id: number) => [...trialKeys.all, 'detail', id] as const,
  labels: (id: number) => [...trialKeys.all, 'detail', id, 'labels'] as const,
  /** The species and resins a plan can pick from (read from the reference routes). */
  choices: () => [...trialKeys.all, 'choices'] as const,
};

export const trialListQuery = (q: Partial<TrialListQuery> = {}) =>
  queryOptions({
    queryKey: trialKeys.list(q),
    queryFn: () => api.get(`/trials${queryString({ sort: '-createdAt', ...q })}`, trialListSchema),
    placeholderData: keepPreviousData,
  });

export const trialQuery = (id: number) =>
  queryOptions({
    queryKey: trialKeys.detail(id),
    queryFn: async () => (await api.get(`/trials/${id}`, trialResponseSchema)).trial,
  });

export const labelSheetQuery = (id: number) =>
  queryOptions({
    queryKey: trialKeys.labels(id),
    queryFn: () => api.get(`/trials/${id}/labels`, labelSheetSchema),
  });

// A shop's reference lists are tens of rows; one page of the largest size the API allows holds them.
export const planChoicesQuery = () =>
  queryOptions({
    queryKey: trialKeys.choices(),
    queryFn: async () => {
      const [species, resins] = await Promise.all([
        api.get(`/species${queryString({ sort: 'commonName', pageSize: 200 })}`, speciesListSchema),
        api.get(`/resins${queryString({ sort: 'name', pageSize: 200 })}`, resinListSchema),
      ]);
      return { species: species.items, resins: resins.items };
    },
    staleTime: 60_000,
  });
