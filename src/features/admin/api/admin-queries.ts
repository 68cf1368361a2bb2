import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { api, queryString } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/queries/keys';
import { useInvalidate } from '../../../lib/queries/invalidate';
import { settingsResponseSchema } from '../../../lib/queries/settings';
import { backupResponseSchema, outboxListSchema, type UpdateShopSettingsInput } from '../../../../shared/schemas/admin';

export const outboxQuery = (page = 1) =>
  queryOptions({ queryKey: queryKeys.outbox.page(page), queryFn: () => api.get(`/admin/outbox${queryString({ page, pageSize: 25 })}`, outboxListSchema) });

export function useUpdateSettings() {
  const qc = useQueryClient();
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: (input: UpdateShopSettingsInput) => api.patch('/settings', input, settingsResponseSchema),
    onSuccess: ({ settings }) => {
      qc.setQueryData(queryKeys.settings.all, settings);
      // The bench's timers and a run's checks read the shop's settings too.
      return invalidate('settings');
    },
  });
}

export function useBackup() {
  return useMutation({ mutationFn: () => api.post('/admin/backup', undefined, backupResponseSchema) });
}
