import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import {
  userResponseSchema,
  type InvitationAcceptInput,
  type LoginInput,
  type PasswordResetConfirmInput,
  type PasswordResetRequestInput,
  type UpdatePreferencesInput,
} from '../../../../shared/schemas/auth';
import { adminUserResponseSchema, type InviteUserInput, type UpdateUserInput } from '../../../../shared/schemas/admin';
import { acceptedSchema } from './auth-queries';
import { queryKeys } from '../../../lib/queries/keys';
import { useInvalidate } from '../../../lib/queries/invalidate';

export function useSignIn() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: LoginInput) => api.post('/auth/login', input, userResponseSchema),
    onSuccess: ({ user }) => {
      qc.clear();
      qc.setQueryData(queryKeys.session.me(), user);
    },
  });
}

export function useSignOut() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api.post('/auth/logout', undefined, null),
    onSettled: () => {
      qc.clear();
      qc.setQueryData(queryKeys.session.me(), null);
    },
  });
}

export function useUpdatePreferences() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: UpdatePreferencesInput) => api.patch('/auth/me', input, userResponseSchema),
    onSuccess: ({ user }) => qc.setQueryData(queryKeys.session.me(), user),
  });
}

export function useRequestPasswordReset() {
  return useMutation({ mutationFn: (input: PasswordResetRequestInput) => api.post('/auth/password-reset', input, acceptedSchema) });
}

export function useConfirmPasswordReset() {
  return useMutation({ mutationFn: (input: PasswordResetConfirmInput) => api.post('/auth/password-reset/confirm', input, acceptedSchema) });
}

export function useAcceptInvitation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: InvitationAcceptInput) => api.post('/auth/invitations/accept', input, userResponseSchema),
    onSuccess: ({ user }) => {
      qc.clear();
      qc.setQueryData(queryKeys.session.me(), user);
    },
  });
}

const oneUser = adminUserResponseSchema;

export function useInviteUser() {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: (input: InviteUserInput) => api.post('/users/invitations', input, oneUser),
    onSuccess: () => invalidate('users', 'outbox'),
  });
}

export function useUpdateUser() {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: ({ id, ...input }: UpdateUserInput & { id: number }) => api.patch(`/users/${id}`, input, oneUser),
    onSuccess: () => invalidate('users'),
  });
}
