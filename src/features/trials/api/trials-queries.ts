import { queryOptions } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/queries/keys';
import { labelSheetSchema } from '../../../../shared/schemas/trials';

// Lists and single trials are read through src/lib/queries/records.ts (other features show them too).

export const labelSheetQuery = (id: number) =>
  queryOptions({
    queryKey: queryKeys.trials.labels(id),
    queryFn: () => api.get(`/trials/${id}/labels`, labelSheetSchema),
  });
