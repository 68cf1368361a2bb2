import { queryOptions } from '@tanstack/react-query';
import { z } from 'zod';
import { api, ApiError, queryString } from '../../../lib/api-client';
import { userResponseSchema } from '../../../../shared/schemas/auth';
import { userListSchema } from '../../../../shared/schemas/admin';
import type { ListQuery } from '../../../../shared/schemas/common';

export const authKeys = {
  all: ['auth'] as const,
  me: () => [...authKeys.all, 'me'] as const,
};
export const usersKeys = {
  all: ['users'] as const,
  list: (q: Partial<ListQuery>) => [...usersKeys.all, 'list', q] as const,
};

/** The signed-in user, or null when nobody is (a 401 here is an answer, not an error). */
export const meQuery = () =>
  queryOptions({
    queryKey: authKeys.me(),
    queryFn: async () => {
      try {
        return (await api.get('/auth/me', userResponseSchema)).user;
      } catch (err) {
        if (err instanceof ApiError && err.status === 401) return null;
        throw err;
      }
    },
    staleTime: 60_000,
  });

export const usersQuery = (q: Partial<ListQuery> = {}) =>
  queryOptions({
    queryKey: usersKeys.list(q),
    queryFn: () => api.get(`/users${queryString({ ...q, pageSize: q.pageSize ?? 200 })}`, userListSchema),
  });

export const acceptedSchema = z.object({ accepted: z.literal(true) });
