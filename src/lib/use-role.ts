import { useQuery } from '@tanstack/react-query';
import { roleAtLeast, type Role } from '../../shared/constants/roles';
import { userResponseSchema } from '../../shared/schemas/auth';
import { api } from './api-client';

// Same cache entry as the auth feature's `me` query (same key); disabled so it never fetches on its
// own: the signed-in layout has already loaded it before any screen renders.
const meKey = ['auth', 'me'] as const;

/** The signed-in user's role, and `can(min)` to decide which buttons to show. The server enforces roles anyway. */
export function useRole(): { role: Role | null; can: (min: Role) => boolean } {
  const me = useQuery({
    queryKey: meKey,
    queryFn: async () => (await api.get('/auth/me', userResponseSchema)).user,
    enabled: false,
  });
  const role = me.data?.role ?? null;
  return { role, can: (min: Role) => role !== null && roleAtLeast(role, min) };
}
