import { z } from 'zod';
import { ROLES } from '../constants/roles';
import { userSchema } from './auth';
import { altitudeMSchema, emailSchema, listResponseSchema, nameSchema } from './common';

export const inviteUserSchema = z.strictObject({ email: emailSchema, name: nameSchema, role: z.enum(ROLES) });
export type InviteUserInput = z.infer<typeof inviteUserSchema>;

export const updateUserSchema = z
  .strictObject({ role: z.enum(ROLES).optional(), disabled: z.boolean().optional() })
  .refine((v) => v.role !== undefined || v.disabled !== undefined, { message: 'Change the role or the disabled flag' });
export type UpdateUserInput = z.infer<typeof updateUserSchema>;

export const adminUserSchema = userSchema.extend({
  createdAt: z.string(),
  invitationPending: z.boolean(),
});
export type AdminUser = z.infer<typeof adminUserSchema>;
export const userListSchema = listResponseSchema(adminUserSchema);

export const outboxMessageSchema = z.object({
  id: z.number().int(),
  createdAt: z.string(),
  from: z.string(),
  to: z.string(),
  subject: z.string(),
  text: z.string(),
});
export type OutboxMessage = z.infer<typeof outboxMessageSchema>;
export const outboxListSchema = listResponseSchema(outboxMessageSchema);

export const backupResponseSchema = z.object({ file: z.string(), bytes: z.number().int() });

/** Shop-wide settings. Altitude feeds the vacuum arithmetic; the drying rule feeds the constant-mass check. */
export const shopSettingsSchema = z.object({
  shopName: z.string().trim().min(1).max(120),
  altitudeM: altitudeMSchema,
  dryingMinIntervalHours: z.number().min(0.5).max(48),
  dryingMaxChangePct: z.number().min(0.01).max(5),
  lotShelfLifeDays: z.number().int().min(1).max(3650),
  /** Base address printed labels' QR codes open; empty (null) means the server's APP_URL. */
  labelBaseUrl: z
    .url({ protocol: /^https?$/, error: 'Give a web address starting with http:// or https://' })
    .max(300)
    .refine((u) => !/[?#]/.test(u), 'Give the address without ? or #')
    .nullable(),
});
export type ShopSettings = z.infer<typeof shopSettingsSchema>;
export const updateShopSettingsSchema = shopSettingsSchema.partial().strict();
export type UpdateShopSettingsInput = z.infer<typeof updateShopSettingsSchema>;

/** Defaults: sea level; a drying check is constant when two weighings ≥ 2 h apart differ < 0.1 %
 * (the oven-dry convention quoted from EN 13183-1 / ASTM D4442 practice); lots keep about a year. */
export const DEFAULT_SHOP_SETTINGS: ShopSettings = {
  shopName: 'My shop',
  altitudeM: 0,
  dryingMinIntervalHours: 2,
  dryingMaxChangePct: 0.1,
  lotShelfLifeDays: 365,
  labelBaseUrl: null,
};

export const labelAddressSchema = z.object({
  url: z.string(),
  source: z.enum(['setting', 'app-url']),
  loopback: z.boolean(),
  warning: z.string().nullable(),
});

/** GET and PATCH /settings: the settings and the address labels will use with them. */
export const settingsResponseSchema = z.object({ settings: shopSettingsSchema, labelAddress: labelAddressSchema });
export type SettingsResponse = z.infer<typeof settingsResponseSchema>;

/** One user as the admin's screens see it, after an invitation or a change. */
export const adminUserResponseSchema = z.object({ user: adminUserSchema });
