import { queryOptions } from '@tanstack/react-query';
import { api, queryString } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/queries/keys';
import { userListSchema } from '../../../../shared/schemas/admin';
import { acceptedResponseSchema, invitationPreviewSchema } from '../../../../shared/schemas/auth';
import type { ListQuery } from '../../../../shared/schemas/common';

// The signed-in user's query lives in src/lib/session.ts (every feature reads it).

export const usersQuery = (q: Partial<ListQuery> = {}) =>
  queryOptions({
    queryKey: queryKeys.users.list(q),
    queryFn: () => api.get(`/users${queryString({ ...q, pageSize: q.pageSize ?? 200 })}`, userListSchema),
  });

/** The answer of the password-reset requests. */
export const acceptedSchema = acceptedResponseSchema;

/** Whom an invitation link invites, so the page greets them and prefills the name the admin typed. */
export const invitationQuery = (token: string) =>
  queryOptions({
    queryKey: queryKeys.users.invitation(token),
    queryFn: async () => (await api.get(`/auth/invitations/${encodeURIComponent(token)}`, invitationPreviewSchema)).invitation,
    retry: false,
    staleTime: Infinity,
  });
