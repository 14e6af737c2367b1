import type { EntityManager } from '@mikro-orm/sqlite';
import type { MeUser } from '#shared/schemas/auth.ts';
import { AppError } from '../../http/errors.ts';
import { User } from './user.entity.ts';
import { dummyPasswordHash, hashPassword, verifyPassword } from './password.ts';

export const SIGN_IN_FAILED = 'E-mail or password is incorrect';

export function toMe(user: User): MeUser {
  return { id: user.id, email: user.email, name: user.name, roles: user.roles, unitSystem: user.unitSystem, crewId: user.crewId };
}

export const ACCOUNT_DEACTIVATED = 'This account has been deactivated; ask an operations admin to reactivate it';

/**
 * Checks credentials; an unknown e-mail and a wrong password fail alike. Only someone who knows the right password
 * learns that the account is deactivated (still 401, with its own words), so the answer tells a stranger nothing new.
 */
export async function checkCredentials(em: EntityManager, email: string, password: string): Promise<User> {
  const user = await em.findOne(User, { email: email.trim().toLowerCase() });
  if (!user || !user.passwordHash) {
    await verifyPassword(await dummyPasswordHash(), password);
    throw new AppError(401, 'unauthenticated', SIGN_IN_FAILED);
  }
  if (!(await verifyPassword(user.passwordHash, password))) throw new AppError(401, 'unauthenticated', SIGN_IN_FAILED);
  if (!user.active) throw new AppError(401, 'unauthenticated', ACCOUNT_DEACTIVATED);
  return user;
}

export async function changePassword(em: EntityManager, user: User, currentPassword: string, newPassword: string) {
  if (!user.passwordHash || !(await verifyPassword(user.passwordHash, currentPassword))) {
    throw AppError.field('currentPassword', 'Current password is incorrect');
  }
  user.passwordHash = await hashPassword(newPassword);
  await em.flush();
}
