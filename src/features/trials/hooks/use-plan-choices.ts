import { useQuery } from '@tanstack/react-query';
import { resinListQuery, speciesListQuery } from '../../../lib/queries/reference';

/** The species and resins a plan can pick from: the same cached lists every picker reads. */
export function usePlanChoices() {
  const species = useQuery(speciesListQuery());
  const resins = useQuery(resinListQuery());
  return {
    isPending: species.isPending || resins.isPending,
    isError: species.isError || resins.isError,
    error: species.error ?? resins.error,
    data: species.data && resins.data ? { species: species.data.items, resins: resins.data.items } : undefined,
  };
}
