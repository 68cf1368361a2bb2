import { z } from 'zod';
import { ROLES } from '../constants/roles';
import {
  ALTITUDE_UNITS,
  DENSITY_UNITS,
  FORCE_UNITS,
  LENGTH_UNITS,
  LIQUID_VOLUME_UNITS,
  MASS_UNITS,
  PRESSURE_UNITS,
  TEMPERATURE_UNITS,
  UNIT_SYSTEMS_LIST,
  VOLUME_UNITS,
} from '../constants/units';
import { emailSchema, nameSchema, passwordSchema } from './common';

/** A display unit for every quantity (see shared/units.ts). */
export const unitPrefsSchema = z.strictObject({
  mass: z.enum(MASS_UNITS),
  length: z.enum(LENGTH_UNITS),
  temperature: z.enum(TEMPERATURE_UNITS),
  pressure: z.enum(PRESSURE_UNITS),
  volume: z.enum(VOLUME_UNITS),
  liquidVolume: z.enum(LIQUID_VOLUME_UNITS),
  density: z.enum(DENSITY_UNITS),
  altitude: z.enum(ALTITUDE_UNITS),
  force: z.enum(FORCE_UNITS),
});

export const userSchema = z.object({
  id: z.number().int(),
  email: z.string(),
  name: z.string(),
  role: z.enum(ROLES),
  /** The preset the user started from. */
  unitSystem: z.enum(UNIT_SYSTEMS_LIST),
  /** The unit of every quantity: the preset with the user's own choices over it. */
  units: unitPrefsSchema,
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

export const tokenSchema = z
  .string()
  .min(20)
  .max(200)
  .regex(/^[A-Za-z0-9_-]+$/, 'Malformed token');

export const passwordResetConfirmSchema = z.strictObject({ token: tokenSchema, password: passwordSchema });
export type PasswordResetConfirmInput = z.infer<typeof passwordResetConfirmSchema>;

export const invitationAcceptSchema = z.strictObject({
  token: tokenSchema,
  password: passwordSchema,
  name: nameSchema,
});
export type InvitationAcceptInput = z.infer<typeof invitationAcceptSchema>;

/**
 * Choosing a preset (`unitSystem`) starts every quantity afresh from it; `units` then changes single
 * quantities on top (of the new preset when both are sent, else of the user's current choice).
 */
export const updatePreferencesSchema = z
  .strictObject({
    unitSystem: z.enum(UNIT_SYSTEMS_LIST).optional(),
    units: unitPrefsSchema.partial().optional(),
    name: nameSchema.optional(),
  })
  .refine((v) => v.unitSystem !== undefined || v.units !== undefined || v.name !== undefined, {
    message: 'Nothing to change: give a name, a unit system or units',
  });
export type UpdatePreferencesInput = z.infer<typeof updatePreferencesSchema>;

export const acceptedResponseSchema = z.object({ accepted: z.literal(true) });

export const invitationTokenParamsSchema = z.strictObject({ token: tokenSchema });

/** What an invitation link shows before it is accepted, so the page can greet the invited person. */
export const invitationPreviewSchema = z.object({
  invitation: z.object({ email: z.string(), name: z.string(), role: z.enum(ROLES), expiresAt: z.string() }),
});
export type InvitationPreview = z.infer<typeof invitationPreviewSchema>['invitation'];
