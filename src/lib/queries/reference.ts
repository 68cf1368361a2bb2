import { keepPreviousData, queryOptions } from '@tanstack/react-query';
import { api, queryString } from '../api-client';
import {
  resinListSchema,
  resinLotListSchema,
  speciesListSchema,
  type ResinListQuery,
  type ResinLotListQuery,
  type SpeciesListQuery,
} from '../../../shared/schemas/reference';
import { queryKeys } from './keys';

// A shop's reference lists are short (tens of rows): one page of the largest size the API allows holds
// them. Every picker and the Reference screen read the same entries, so a species added on one screen
// shows in every other feature's picker at once (its mutation invalidates `queryKeys.species.all`).
const ALL = 200;

/** Species, filtered or (no argument) all of them for a picker. */
export const speciesListQuery = (q: Partial<SpeciesListQuery> = {}) =>
  queryOptions({
    queryKey: queryKeys.species.list(q),
    queryFn: () => api.get(`/species${queryString({ sort: 'commonName', pageSize: ALL, ...q })}`, speciesListSchema),
    placeholderData: keepPreviousData,
    staleTime: 60_000,
  });

/** Resins, filtered or (no argument) all of them for a picker. */
export const resinListQuery = (q: Partial<ResinListQuery> = {}) =>
  queryOptions({
    queryKey: queryKeys.resins.list(q),
    queryFn: () => api.get(`/resins${queryString({ sort: 'name', pageSize: ALL, ...q })}`, resinListSchema),
    staleTime: 60_000,
  });

/** Resin lots, newest activation first, filtered or (no argument) all of them for a picker. */
export const lotListQuery = (q: Partial<ResinLotListQuery> = {}) =>
  queryOptions({
    queryKey: queryKeys.lots.list(q),
    queryFn: () => api.get(`/resin-lots${queryString({ sort: '-activatedAt', pageSize: ALL, ...q })}`, resinLotListSchema),
    staleTime: 60_000,
  });
