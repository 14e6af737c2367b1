import { z } from 'zod';
import { ROLES } from '../roles.ts';

export const roleSchema = z.enum(ROLES);
export const unitSystemSchema = z.enum(['metric', 'us']);
export type UnitSystem = z.infer<typeof unitSystemSchema>;

export const signInSchema = z.object({
  email: z.email({ message: 'Enter a valid e-mail address' }).max(254),
  password: z.string().min(1, 'Enter your password').max(256),
});
export type SignInInput = z.infer<typeof signInSchema>;

export const PASSWORD_MIN_LENGTH = 10;
export const newPasswordSchema = z
  .string()
  .min(PASSWORD_MIN_LENGTH, `Use at least ${PASSWORD_MIN_LENGTH} characters`)
  .max(256, 'Use at most 256 characters');

export const accountUpdateSchema = z
  .object({
    name: z.string().trim().min(1, 'Enter your name').max(120),
    unitSystem: unitSystemSchema,
  })
  .partial();
export type AccountUpdateInput = z.infer<typeof accountUpdateSchema>;

export const passwordChangeSchema = z.object({
  currentPassword: z.string().min(1, 'Enter your current password').max(256),
  newPassword: newPasswordSchema,
});
export type PasswordChangeInput = z.infer<typeof passwordChangeSchema>;

export interface MeUser {
  id: string;
  email: string;
  name: string;
  roles: z.infer<typeof roleSchema>[];
  unitSystem: UnitSystem;
  crewId: string | null;
}
