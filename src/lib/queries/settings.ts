import { queryOptions } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../api-client';
import { settingsResponseSchema as fullSettingsResponseSchema, shopSettingsSchema } from '../../../shared/schemas/admin';
import { queryKeys } from './keys';

export const settingsResponseSchema = z.object({ settings: shopSettingsSchema });

/** The shop's settings (name, altitude, drying rule, shelf life); every signed-in screen may read them. */
export const settingsQuery = () =>
  queryOptions({
    queryKey: queryKeys.settings.all,
    queryFn: async () => (await api.get('/settings', settingsResponseSchema)).settings,
    staleTime: 300_000,
  });

/** The address printed labels' QR codes open, and whether a phone can open it. */
export const labelAddressQuery = () =>
  queryOptions({
    queryKey: queryKeys.settings.labelAddress(),
    queryFn: async () => (await api.get('/settings', fullSettingsResponseSchema)).labelAddress,
  });
