import { z } from 'zod';
import { ROLES } from '../constants/roles';
import { UNIT_SYSTEMS_LIST } from '../constants/units';
import { emailSchema, nameSchema, passwordSchema } from './common';

export const userSchema = z.object({
  id: z.number().int(),
  email: z.string(),
  name: z.string(),
  role: z.enum(ROLES),
  unitSystem: z.enum(UNIT_SYSTEMS_LIST),
  disabled: z.boolean(),
});
export type User = z.infer<typeof userSchema>;

export const userResponseSchema = z.object({ user: userSchema });

export const loginSchema = z.strictObject({
  email: emailSchema,
  // No minimum here: a short wrong password must get the same answer as a long one.
  password: z.string().min(1, 'Enter your password').max(200),
});
export type LoginInput = z.infer<typeof loginSchema>;

export const passwordResetRequestSchema = z.strictObject({ email: emailSchema });
export type PasswordResetRequestInput = z.infer<typeof passwordResetRequestSchema>;

const tokenSchema = z.string().min(20).max(200).regex(/^[A-Za-z0-9_-]+$/, 'Malformed token');

export const passwordResetConfirmSchema = z.strictObject({ token: tokenSchema, password: passwordSchema });
export type PasswordResetConfirmInput = z.infer<typeof passwordResetConfirmSchema>;

export const invitationAcceptSchema = z.strictObject({
  token: tokenSchema,
  password: passwordSchema,
  name: nameSchema,
});
export type InvitationAcceptInput = z.infer<typeof invitationAcceptSchema>;

export const updatePreferencesSchema = z
  .strictObject({
    unitSystem: z.enum(UNIT_SYSTEMS_LIST).optional(),
    name: nameSchema.optional(),
  })
  .refine((v) => v.unitSystem !== undefined || v.name !== undefined, { message: 'Nothing to change: give a name or a unit system' });
export type UpdatePreferencesInput = z.infer<typeof updatePreferencesSchema>;

export const acceptedResponseSchema = z.object({ accepted: z.literal(true) });
