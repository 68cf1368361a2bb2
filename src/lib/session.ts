import { queryOptions, useQuery } from '@tanstack/react-query';
import { roleAtLeast, type Role } from '../../shared/constants/roles';
import { userResponseSchema, type User } from '../../shared/schemas/auth';
import { api, ApiError } from './api-client';
import { queryKeys } from './queries/keys';

/**
 * The signed-in user, or null when nobody is (a 401 here is an answer, not an error). The one query of
 * the session: sign-in, sign-out and preferences write this entry; a 401 anywhere sets it to null.
 */
export const meQuery = () =>
  queryOptions({
    queryKey: queryKeys.session.me(),
    queryFn: async (): Promise<User | null> => {
      try {
        return (await api.get('/auth/me', userResponseSchema)).user;
      } catch (err) {
        if (err instanceof ApiError && err.status === 401) return null;
        throw err;
      }
    },
    staleTime: 5 * 60_000,
  });

/** The signed-in user (undefined while loading, null when signed out). */
export function useMe(): User | null | undefined {
  return useQuery(meQuery()).data;
}

/** The signed-in user's role, and `can(min)` to decide which buttons to show. The server enforces roles anyway. */
export function useRole(): { role: Role | null; can: (min: Role) => boolean } {
  // `select` keeps a component from re-rendering when anything but the role changes.
  const role = useQuery({ ...meQuery(), select: (u) => u?.role ?? null }).data ?? null;
  return { role, can: (min: Role) => role !== null && roleAtLeast(role, min) };
}
