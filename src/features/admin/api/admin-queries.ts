import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api, queryString } from '../../../lib/api-client';
import { backupResponseSchema, outboxListSchema, shopSettingsSchema, type UpdateShopSettingsInput } from '../../../../shared/schemas/admin';

export const adminKeys = {
  all: ['admin'] as const,
  outbox: (page: number) => [...adminKeys.all, 'outbox', page] as const,
  settings: () => ['settings'] as const,
};

const settingsResponse = z.object({ settings: shopSettingsSchema });

export const outboxQuery = (page = 1) =>
  queryOptions({ queryKey: adminKeys.outbox(page), queryFn: () => api.get(`/admin/outbox${queryString({ page, pageSize: 25 })}`, outboxListSchema) });

export const settingsQuery = () =>
  queryOptions({ queryKey: adminKeys.settings(), queryFn: async () => (await api.get('/settings', settingsResponse)).settings, staleTime: 300_000 });

export function useUpdateSettings() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: UpdateShopSettingsInput) => api.patch('/settings', input, settingsResponse),
    onSuccess: ({ settings }) => qc.setQueryData(adminKeys.settings(), settings),
  });
}

export function useBackup() {
  return useMutation({ mutationFn: () => api.post('/admin/backup', undefined, backupResponseSchema) });
}
