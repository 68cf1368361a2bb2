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
import { adminUserSchema, type InviteUserInput, type UpdateUserInput } from '../../../../shared/schemas/admin';
import { z } from 'zod';
import { acceptedSchema, authKeys, usersKeys } from './auth-queries';

export function useSignIn() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: LoginInput) => api.post('/auth/login', input, userResponseSchema),
    onSuccess: ({ user }) => {
      qc.clear();
      qc.setQueryData(authKeys.me(), user);
    },
  });
}

export function useSignOut() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api.post('/auth/logout', undefined, null),
    onSettled: () => {
      qc.clear();
      qc.setQueryData(authKeys.me(), null);
    },
  });
}

export function useUpdatePreferences() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: UpdatePreferencesInput) => api.patch('/auth/me', input, userResponseSchema),
    onSuccess: ({ user }) => qc.setQueryData(authKeys.me(), user),
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
      qc.setQueryData(authKeys.me(), user);
    },
  });
}

const oneUser = z.object({ user: adminUserSchema });

export function useInviteUser() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: InviteUserInput) => api.post('/users/invitations', input, oneUser),
    onSuccess: () => qc.invalidateQueries({ queryKey: usersKeys.all }),
  });
}

export function useUpdateUser() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...input }: UpdateUserInput & { id: number }) => api.patch(`/users/${id}`, input, oneUser),
    onSuccess: () => qc.invalidateQueries({ queryKey: usersKeys.all }),
  });
}
