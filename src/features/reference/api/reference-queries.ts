import { keepPreviousData, queryOptions } from '@tanstack/react-query';
import { api, queryString } from '../../../lib/api-client';
import {
  resinListSchema,
  resinLotListSchema,
  speciesListSchema,
  type ResinListQuery,
  type ResinLotListQuery,
  type SpeciesListQuery,
} from '../../../../shared/schemas/reference';

export const speciesKeys = {
  all: ['species'] as const,
  list: (q: Partial<SpeciesListQuery>) => [...speciesKeys.all, 'list', q] as const,
};
export const resinKeys = {
  all: ['resins'] as const,
  list: (q: Partial<ResinListQuery>) => [...resinKeys.all, 'list', q] as const,
};
export const lotKeys = {
  all: ['resin-lots'] as const,
  list: (q: Partial<ResinLotListQuery>) => [...lotKeys.all, 'list', q] as const,
};

// A shop's reference lists are short (tens of rows), so each screen asks for one page of the largest
// size the API allows rather than paging.
const ALL = 200;

export const speciesListQuery = (q: Partial<SpeciesListQuery> = {}) =>
  queryOptions({
    queryKey: speciesKeys.list(q),
    queryFn: () => api.get(`/species${queryString({ sort: 'commonName', pageSize: ALL, ...q })}`, speciesListSchema),
    placeholderData: keepPreviousData,
  });

export const resinListQuery = (q: Partial<ResinListQuery> = {}) =>
  queryOptions({
    queryKey: resinKeys.list(q),
    queryFn: () => api.get(`/resins${queryString({ sort: 'name', pageSize: ALL, ...q })}`, resinListSchema),
  });

export const lotListQuery = (q: Partial<ResinLotListQuery> = {}) =>
  queryOptions({
    queryKey: lotKeys.list(q),
    queryFn: () => api.get(`/resin-lots${queryString({ sort: '-activatedAt', pageSize: ALL, ...q })}`, resinLotListSchema),
  });
