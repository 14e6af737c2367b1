import type { EntityManager } from '@mikro-orm/sqlite';
import { generateIdFromEntropySize } from 'lucia';
import type { ResetPasswordInput } from '#shared/schemas/accounts.ts';
import type { AppLucia } from './lucia.ts';
import { AppError } from '../../http/errors.ts';
import { audit } from '../audit/audit.service.ts';
import type { Mailer } from '../mail/mail.service.ts';
import { passwordResetMail } from '../mail/mail-templates.ts';
import { User } from './user.entity.ts';
import { PasswordReset } from './reset.entity.ts';
import { hashToken, newOneTimeToken } from './invitation-token.ts';
import { hashPassword } from './password.ts';
import { isCommonPassword } from './common-passwords.ts';
import { normaliseEmail } from './invitation.service.ts';

export const RESET_TTL_MS = 60 * 60_000;
/** At most one reset e-mail per account in this time, however often it is asked for. */
export const RESET_COOLDOWN_MS = 60_000;
export const RESET_REQUESTED = 'If an account uses that e-mail, a link to choose a new password is on its way.';
export const RESET_LINK_INVALID = 'This reset link is no longer valid. Ask for a new one.';

/**
 * Starts a reset for an active account and returns the mail being sent, or null. The caller answers the same either way
 * and sends in the background, so neither the answer nor its timing tells whether the address has an account.
 */
export async function requestPasswordReset(em: EntityManager, mailer: Mailer, email: string, origin: string): Promise<{ sending: Promise<void> } | null> {
  const user = await em.findOne(User, { email: normaliseEmail(email), active: true });
  if (!user || !user.passwordHash) return null;
  const now = new Date();
  const recent = await em.findOne(PasswordReset, { userId: user.id, usedAt: null, createdAt: { $gt: new Date(now.getTime() - RESET_COOLDOWN_MS) } });
  if (recent) return null;
  const { token, tokenHash } = newOneTimeToken();
  const reset = em.create(PasswordReset, { id: generateIdFromEntropySize(10), userId: user.id, tokenHash, expiresAt: new Date(now.getTime() + RESET_TTL_MS), createdAt: now, usedAt: null });
  audit(em, { actorId: null, action: 'account.password-reset-request', recordType: 'user', recordId: user.id });
  await em.flush();
  const link = `${origin}/reset-password?token=${encodeURIComponent(token)}`;
  const mail = passwordResetMail({ name: user.name, link, expiresAt: reset.expiresAt });
  const sending = mailer.send({ to: user.email, ...mail, secrets: [token] }).catch((err: Error) => console.error(`Password-reset mail failed: ${err.message}`));
  return { sending };
}

export async function resetPassword(em: EntityManager, lucia: AppLucia, input: ResetPasswordInput) {
  const invalid = () => AppError.badRequest(RESET_LINK_INVALID, [{ path: 'token', message: RESET_LINK_INVALID }]);
  const reset = await em.findOne(PasswordReset, { tokenHash: hashToken(input.token) });
  if (!reset || reset.usedAt || reset.expiresAt <= new Date()) throw invalid();
  const user = await em.findOne(User, { id: reset.userId, active: true });
  if (!user) throw invalid();
  if (isCommonPassword(input.password)) throw AppError.field('password', 'This password is too common; choose another');
  const passwordHash = await hashPassword(input.password);
  const now = new Date();
  const claimed = await em.nativeUpdate(PasswordReset, { id: reset.id, usedAt: null }, { usedAt: now });
  if (!claimed) throw invalid();
  // Every other outstanding link of this account stops working too.
  await em.nativeUpdate(PasswordReset, { userId: user.id, usedAt: null }, { usedAt: now });
  user.passwordHash = passwordHash;
  audit(em, { actorId: user.id, action: 'account.password-reset', recordType: 'user', recordId: user.id });
  await em.flush();
  // Whoever held the old password is signed out everywhere.
  await lucia.invalidateUserSessions(user.id);
}
