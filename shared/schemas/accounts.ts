// Accounts, invitations, password reset, crews and the audit log: schemas shared by the admin pages and the server.
import { z } from 'zod';
import type { Role } from '../roles.ts';
import { newPasswordSchema, roleSchema } from './auth.ts';

const rolesSchema = z
  .array(roleSchema)
  .min(1, 'Give at least one role')
  .max(4)
  .refine((roles) => new Set(roles).size === roles.length, 'Each role once');

export const personNameSchema = z.string().trim().min(1, 'Enter a name').max(120, 'Use at most 120 characters');
const tokenSchema = z.string().min(1, 'The link has no token').max(200, 'The link is not valid');

export const invitationCreateSchema = z.object({
  email: z.email({ message: 'Enter a valid e-mail address' }).max(254),
  name: personNameSchema,
  roles: rolesSchema,
  crewId: z.string().min(1).max(64).nullable().optional(),
});
export type InvitationCreateInput = z.infer<typeof invitationCreateSchema>;

export const acceptInvitationSchema = z.object({ token: tokenSchema, password: newPasswordSchema });
export type AcceptInvitationInput = z.infer<typeof acceptInvitationSchema>;

export const requestPasswordResetSchema = z.object({ email: z.email({ message: 'Enter a valid e-mail address' }).max(254) });
export const resetPasswordSchema = z.object({ token: tokenSchema, password: newPasswordSchema });
export type ResetPasswordInput = z.infer<typeof resetPasswordSchema>;

export const userUpdateSchema = z
  .object({
    name: personNameSchema,
    roles: rolesSchema,
    crewId: z.string().min(1).max(64).nullable(),
  })
  .partial();
export type UserUpdateInput = z.infer<typeof userUpdateSchema>;

export const userListQuerySchema = z.object({
  q: z.string().max(120).optional(),
  role: roleSchema.optional(),
  /** A crew id, or "none" for users without a crew. */
  crewId: z.string().max(64).optional(),
  active: z.enum(['true', 'false']).optional(),
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
});

export const crewSchema = z.object({ name: z.string().trim().min(1, 'Enter a crew name').max(80, 'Use at most 80 characters') });
export type CrewInput = z.infer<typeof crewSchema>;

export const auditQuerySchema = z.object({
  userId: z.string().max(64).optional(),
  recordType: z.string().max(64).optional(),
  recordId: z.string().max(128).optional(),
  action: z.string().max(128).optional(),
  from: z.iso.date({ message: 'Use a date like 2026-01-31' }).or(z.iso.datetime({ offset: true })).optional(),
  to: z.iso.date({ message: 'Use a date like 2026-01-31' }).or(z.iso.datetime({ offset: true })).optional(),
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
});

export interface AdminUser {
  id: string;
  email: string;
  name: string;
  roles: Role[];
  crewId: string | null;
  crewName: string | null;
  active: boolean;
  createdAt: string;
  lastSignInAt: string | null;
}

export interface CrewItem {
  id: string;
  name: string;
  memberCount: number;
  createdAt: string;
}

export interface InvitationItem {
  id: string;
  email: string;
  name: string;
  roles: Role[];
  crewId: string | null;
  expiresAt: string;
  createdAt: string;
  invitedByName: string | null;
  expired: boolean;
  /** Whether the e-mail went out (false when the mail server refused; resend it). */
  mailSent?: boolean;
}

export interface OutboxItem {
  id: number;
  to: string;
  subject: string;
  text: string;
  html: string | null;
  sentAt: string;
  via: 'catcher' | 'smtp';
}

export interface AuditItem {
  id: number;
  at: string;
  actorId: string | null;
  actorName: string | null;
  action: string;
  recordType: string;
  recordId: string;
  before: unknown;
  after: unknown;
}

export interface Page<T> {
  items: T[];
  total: number;
  page: number;
  pageSize: number;
}
