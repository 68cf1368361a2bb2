import { queryOptions } from '@tanstack/react-query';
import { api } from '../api-client';
import { optionsResponseSchema } from '../../../shared/schemas/options';
import { queryKeys } from './keys';

// Pickers read the light `/options` lists ({ id, code, label }): a picker of runs does not need every
// run's progress and rule checks. The keys sit under each resource's root, so the same invalidation that
// refreshes a list refreshes its picker.

const optionsOf = (path: string, queryKey: readonly unknown[]) =>
  queryOptions({
    queryKey,
    queryFn: async () => (await api.get(`${path}/options`, optionsResponseSchema)).items,
    staleTime: 30_000,
  });

/** Trials, newest first (up to 500). */
export const trialOptionsQuery = () => optionsOf('/trials', queryKeys.trials.options());
/** Runs, newest first (up to 500). */
export const runOptionsQuery = () => optionsOf('/runs', queryKeys.runs.options());
/** Species by common name; `code` is the botanical name. */
export const speciesOptionsQuery = () => optionsOf('/species', queryKeys.species.options());
/** Resins by name. */
export const resinOptionsQuery = () => optionsOf('/resins', queryKeys.resins.options());
/** Resin lots, newest activation first. */
export const lotOptionsQuery = () => optionsOf('/resin-lots', queryKeys.lots.options());
