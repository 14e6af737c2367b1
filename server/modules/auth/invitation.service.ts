import type { EntityManager } from '@mikro-orm/sqlite';
import { generateIdFromEntropySize } from 'lucia';
import type { AcceptInvitationInput, InvitationCreateInput, InvitationItem } from '#shared/schemas/accounts.ts';
import { AppError } from '../../http/errors.ts';
import { audit } from '../audit/audit.service.ts';
import type { Mailer } from '../mail/mail.service.ts';
import { invitationMail } from '../mail/mail-templates.ts';
import { Crew, User } from './user.entity.ts';
import { Invitation } from './invitation.entity.ts';
import { hashToken, newOneTimeToken } from './invitation-token.ts';
import { hashPassword } from './password.ts';
import { isCommonPassword } from './common-passwords.ts';

export const INVITATION_TTL_MS = 72 * 3600_000;
export const INVITATION_LINK_INVALID = 'This invitation link is no longer valid. Ask your admin for a new one.';

export const normaliseEmail = (email: string) => email.trim().toLowerCase();

export function toInvitationItem(inv: Invitation, invitedByName: string | null, now = new Date()): InvitationItem {
  return {
    id: inv.id,
    email: inv.email,
    name: inv.name,
    roles: inv.roles,
    crewId: inv.crewId,
    expiresAt: inv.expiresAt.toISOString(),
    createdAt: inv.createdAt.toISOString(),
    invitedByName,
    expired: inv.expiresAt <= now,
  };
}

async function sendInvitation(mailer: Mailer, inv: Invitation, token: string, inviter: User, origin: string): Promise<boolean> {
  const link = `${origin}/accept-invitation?token=${encodeURIComponent(token)}`;
  const mail = invitationMail({ name: inv.name, roles: inv.roles, invitedBy: inviter.name, link, expiresAt: inv.expiresAt });
  try {
    await mailer.send({ to: inv.email, ...mail, secrets: [token] });
    return true;
  } catch (err) {
    console.error(`Invitation mail to ${inv.email} failed: ${(err as Error).message}`);
    return false;
  }
}

/** Creates an invitation (replacing any pending one for the same address) and e-mails its one-time link. */
export async function createInvitation(em: EntityManager, mailer: Mailer, input: InvitationCreateInput, inviter: User, origin: string) {
  const email = normaliseEmail(input.email);
  if (await em.findOne(User, { email })) throw AppError.conflict('An account with this e-mail already exists', [{ path: 'email', message: 'An account with this e-mail already exists' }]);
  const crewId = input.crewId ?? null;
  if (crewId && !(await em.findOne(Crew, { id: crewId }))) throw AppError.field('crewId', 'No such crew');
  const now = new Date();
  for (const old of await em.find(Invitation, { email, acceptedAt: null, revokedAt: null })) old.revokedAt = now;
  const { token, tokenHash } = newOneTimeToken();
  const inv = em.create(Invitation, {
    id: generateIdFromEntropySize(10),
    email,
    name: input.name,
    roles: input.roles,
    crewId,
    tokenHash,
    expiresAt: new Date(now.getTime() + INVITATION_TTL_MS),
    invitedById: inviter.id,
    createdAt: now,
    acceptedAt: null,
    revokedAt: null,
    userId: null,
  });
  audit(em, { actorId: inviter.id, action: 'invitation.create', recordType: 'invitation', recordId: inv.id, after: { email, name: inv.name, roles: inv.roles, crewId } });
  await em.flush();
  const mailSent = await sendInvitation(mailer, inv, token, inviter, origin);
  return { ...toInvitationItem(inv, inviter.name, now), mailSent };
}

/** A new token for a pending invitation (the old link stops working) and a new e-mail. */
export async function resendInvitation(em: EntityManager, mailer: Mailer, id: string, actor: User, origin: string) {
  const inv = await em.findOne(Invitation, { id, acceptedAt: null, revokedAt: null });
  if (!inv) throw AppError.notFound('Pending invitation');
  const { token, tokenHash } = newOneTimeToken();
  const now = new Date();
  inv.tokenHash = tokenHash;
  inv.expiresAt = new Date(now.getTime() + INVITATION_TTL_MS);
  audit(em, { actorId: actor.id, action: 'invitation.resend', recordType: 'invitation', recordId: inv.id, after: { email: inv.email, expiresAt: inv.expiresAt.toISOString() } });
  await em.flush();
  const mailSent = await sendInvitation(mailer, inv, token, actor, origin);
  return { ...toInvitationItem(inv, actor.name, now), mailSent };
}

export async function revokeInvitation(em: EntityManager, id: string, actor: User) {
  const inv = await em.findOne(Invitation, { id, acceptedAt: null, revokedAt: null });
  if (!inv) throw AppError.notFound('Pending invitation');
  inv.revokedAt = new Date();
  audit(em, { actorId: actor.id, action: 'invitation.revoke', recordType: 'invitation', recordId: inv.id, before: { email: inv.email, name: inv.name, roles: inv.roles } });
  await em.flush();
}

export async function listPendingInvitations(em: EntityManager): Promise<InvitationItem[]> {
  const pending = await em.find(Invitation, { acceptedAt: null, revokedAt: null }, { orderBy: { createdAt: 'desc' } });
  const inviters = await em.find(User, { id: { $in: [...new Set(pending.map((i) => i.invitedById))] } });
  const names = new Map(inviters.map((u) => [u.id, u.name]));
  const now = new Date();
  return pending.map((i) => toInvitationItem(i, names.get(i.invitedById) ?? null, now));
}

/** The pending, unexpired invitation a token belongs to, or a 400 naming the token. */
export async function invitationForToken(em: EntityManager, token: string): Promise<Invitation> {
  const inv = await em.findOne(Invitation, { tokenHash: hashToken(token) });
  if (!inv || inv.acceptedAt || inv.revokedAt || inv.expiresAt <= new Date()) {
    throw AppError.badRequest(INVITATION_LINK_INVALID, [{ path: 'token', message: INVITATION_LINK_INVALID }]);
  }
  return inv;
}

/** Turns an invitation into an active account with the chosen password; the token works once. */
export async function acceptInvitation(em: EntityManager, input: AcceptInvitationInput): Promise<User> {
  const inv = await invitationForToken(em, input.token);
  if (isCommonPassword(input.password)) throw AppError.field('password', 'This password is too common; choose another');
  if (await em.findOne(User, { email: inv.email })) throw AppError.conflict('An account with this e-mail already exists; sign in or reset the password');
  const passwordHash = await hashPassword(input.password);
  const now = new Date();
  // Claim the invitation atomically: of two simultaneous accepts, only one wins.
  const claimed = await em.nativeUpdate(Invitation, { id: inv.id, acceptedAt: null, revokedAt: null }, { acceptedAt: now });
  if (!claimed) throw AppError.badRequest(INVITATION_LINK_INVALID, [{ path: 'token', message: INVITATION_LINK_INVALID }]);
  const crewId = inv.crewId && (await em.findOne(Crew, { id: inv.crewId })) ? inv.crewId : null;
  const user = em.create(User, {
    id: generateIdFromEntropySize(10),
    email: inv.email,
    name: inv.name,
    passwordHash,
    roles: inv.roles,
    unitSystem: 'metric',
    crewId,
    active: true,
    createdAt: now,
    lastSignInAt: now,
  });
  inv.acceptedAt = now;
  inv.userId = user.id;
  audit(em, { actorId: user.id, action: 'invitation.accept', recordType: 'user', recordId: user.id, after: { email: user.email, name: user.name, roles: user.roles, crewId, invitationId: inv.id } });
  await em.flush();
  return user;
}
