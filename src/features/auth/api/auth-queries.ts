import { queryOptions } from '@tanstack/react-query';
import { z } from 'zod';
import { api, queryString } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/queries/keys';
import { userListSchema } from '../../../../shared/schemas/admin';
import type { ListQuery } from '../../../../shared/schemas/common';

// The signed-in user's query lives in src/lib/session.ts (every feature reads it).

export const usersQuery = (q: Partial<ListQuery> = {}) =>
  queryOptions({
    queryKey: queryKeys.users.list(q),
    queryFn: () => api.get(`/users${queryString({ ...q, pageSize: q.pageSize ?? 200 })}`, userListSchema),
  });

export const acceptedSchema = z.object({ accepted: z.literal(true) });
