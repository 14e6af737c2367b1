import type { EntityManager } from '@mikro-orm/sqlite';
import { generateIdFromEntropySize } from 'lucia';
import type { AdminUser, CrewInput, CrewItem, UserUpdateInput } from '#shared/schemas/accounts.ts';
import type { z } from 'zod';
import type { userListQuerySchema } from '#shared/schemas/accounts.ts';
import type { AppLucia } from '../auth/lucia.ts';
import { AppError } from '../../http/errors.ts';
import { audit } from '../audit/audit.service.ts';
import { Crew, User } from '../auth/user.entity.ts';
import { isPostgres, lockForTransaction } from '../../sql/dialect.ts';

/**
 * Role changes and deactivations run one at a time (one app process serves the database), so two admins
 * removing each other at the same moment cannot both pass the last-admin check.
 */
let accountChanges: Promise<unknown> = Promise.resolve();
function oneAtATime<T>(fn: () => Promise<T>): Promise<T> {
  const run = accountChanges.then(fn, fn);
  accountChanges = run.catch(() => undefined);
  return run;
}

export const LAST_ADMIN = 'Roostline needs at least one active admin: give another account the admin role first';

export function toAdminUser(u: User, crewNames: Map<string, string>): AdminUser {
  return {
    id: u.id,
    email: u.email,
    name: u.name,
    roles: u.roles,
    crewId: u.crewId,
    crewName: u.crewId ? (crewNames.get(u.crewId) ?? null) : null,
    active: u.active,
    createdAt: u.createdAt.toISOString(),
    lastSignInAt: u.lastSignInAt ? u.lastSignInAt.toISOString() : null,
  };
}

async function crewNameMap(em: EntityManager) {
  return new Map((await em.find(Crew, {})).map((c) => [c.id, c.name]));
}

export async function listUsers(em: EntityManager, q: z.infer<typeof userListQuerySchema>) {
  const where: Record<string, unknown> = {};
  if (q.active) where.active = q.active === 'true';
  if (q.crewId) where.crewId = q.crewId === 'none' ? null : q.crewId;
  const text = q.q?.trim().toLowerCase();
  // Roles are a JSON list: filtered here (a crew's accounts number in the hundreds, not millions).
  const all = (await em.find(User, where, { orderBy: { name: 'asc', email: 'asc' } })).filter(
    (u) => (!q.role || u.roles.includes(q.role)) && (!text || u.name.toLowerCase().includes(text) || u.email.includes(text)),
  );
  const crews = await crewNameMap(em);
  const start = (q.page - 1) * q.pageSize;
  return { items: all.slice(start, start + q.pageSize).map((u) => toAdminUser(u, crews)), total: all.length, page: q.page, pageSize: q.pageSize };
}

export async function getUser(em: EntityManager, id: string) {
  const user = await em.findOne(User, { id });
  if (!user) throw AppError.notFound('User');
  return user;
}

export async function adminUserView(em: EntityManager, user: User) {
  return toAdminUser(user, await crewNameMap(em));
}

/** Refuses a change that would leave no active admin. */
async function assertAnotherActiveAdmin(em: EntityManager, user: User) {
  const admins = (await em.find(User, { active: true }, { refresh: true })).filter((u) => u.roles.includes('admin') && u.id !== user.id);
  if (admins.length === 0) throw AppError.conflict(LAST_ADMIN);
}

/**
 * One account change at a time across every process: on SQLite the in-process queue above is enough (one server
 * per database file); on PostgreSQL the change runs in a transaction holding the "accounts" advisory lock, so two
 * servers removing the last two admins at once see each other's committed change.
 */
async function accountChange<T>(em: EntityManager, fn: () => Promise<T>): Promise<T> {
  if (!isPostgres(em)) return oneAtATime(fn);
  return oneAtATime(async () => {
    await em.begin();
    try {
      await lockForTransaction(em, 'accounts');
      const out = await fn();
      await em.commit();
      return out;
    } catch (err) {
      await em.rollback();
      throw err;
    }
  });
}

export function updateUser(em: EntityManager, user: User, input: UserUpdateInput, actor: User) {
  return accountChange(em, () => applyUserUpdate(em, user, input, actor));
}

async function applyUserUpdate(em: EntityManager, user: User, input: UserUpdateInput, actor: User) {
  await em.refresh(user);
  if (input.crewId && !(await em.findOne(Crew, { id: input.crewId }))) throw AppError.field('crewId', 'No such crew');
  if (input.roles && user.active && user.roles.includes('admin') && !input.roles.includes('admin')) await assertAnotherActiveAdmin(em, user);
  const before: Record<string, unknown> = {};
  const after: Record<string, unknown> = {};
  for (const key of ['name', 'roles', 'crewId'] as const) {
    if (input[key] === undefined) continue;
    if (JSON.stringify(user[key]) === JSON.stringify(input[key])) continue;
    before[key] = user[key];
    after[key] = input[key];
  }
  if (Object.keys(after).length === 0) return user;
  Object.assign(user, after);
  audit(em, { actorId: actor.id, action: 'user.update', recordType: 'user', recordId: user.id, before, after });
  await em.flush();
  return user;
}

/** Deactivation ends every session of the account at once; sign-in is refused from then on. */
export function deactivateUser(em: EntityManager, lucia: AppLucia, user: User, actor: User) {
  return accountChange(em, () => applyDeactivation(em, lucia, user, actor));
}

async function applyDeactivation(em: EntityManager, lucia: AppLucia, user: User, actor: User) {
  await em.refresh(user);
  if (user.id === actor.id) throw AppError.conflict('You cannot deactivate your own account; ask another admin');
  if (!user.active) return user;
  if (user.roles.includes('admin')) await assertAnotherActiveAdmin(em, user);
  user.active = false;
  audit(em, { actorId: actor.id, action: 'user.deactivate', recordType: 'user', recordId: user.id, before: { active: true }, after: { active: false } });
  await em.flush();
  await lucia.invalidateUserSessions(user.id);
  return user;
}

export async function reactivateUser(em: EntityManager, user: User, actor: User) {
  if (user.active) return user;
  user.active = true;
  audit(em, { actorId: actor.id, action: 'user.reactivate', recordType: 'user', recordId: user.id, before: { active: false }, after: { active: true } });
  await em.flush();
  return user;
}

// Crews

function toCrewItem(c: Crew, memberCount: number): CrewItem {
  return { id: c.id, name: c.name, memberCount, createdAt: c.createdAt.toISOString() };
}

export async function listCrews(em: EntityManager): Promise<CrewItem[]> {
  const crews = await em.find(Crew, {}, { orderBy: { name: 'asc' } });
  const users = await em.find(User, { crewId: { $ne: null } }, { fields: ['id', 'crewId'] });
  const counts = new Map<string, number>();
  for (const u of users) counts.set(u.crewId!, (counts.get(u.crewId!) ?? 0) + 1);
  return crews.map((c) => toCrewItem(c, counts.get(c.id) ?? 0));
}

async function assertCrewNameFree(em: EntityManager, name: string, exceptId?: string) {
  const same = (await em.find(Crew, {})).find((c) => c.name.toLowerCase() === name.toLowerCase() && c.id !== exceptId);
  if (same) throw AppError.conflict('A crew with this name exists', [{ path: 'name', message: 'A crew with this name exists' }]);
}

export async function createCrew(em: EntityManager, input: CrewInput, actor: User) {
  await assertCrewNameFree(em, input.name);
  const crew = em.create(Crew, { id: generateIdFromEntropySize(10), name: input.name, createdAt: new Date() });
  audit(em, { actorId: actor.id, action: 'crew.create', recordType: 'crew', recordId: crew.id, after: { name: crew.name } });
  await em.flush();
  return toCrewItem(crew, 0);
}

export async function renameCrew(em: EntityManager, id: string, input: CrewInput, actor: User) {
  const crew = await em.findOne(Crew, { id });
  if (!crew) throw AppError.notFound('Crew');
  await assertCrewNameFree(em, input.name, crew.id);
  if (crew.name !== input.name) {
    audit(em, { actorId: actor.id, action: 'crew.update', recordType: 'crew', recordId: crew.id, before: { name: crew.name }, after: { name: input.name } });
    crew.name = input.name;
    await em.flush();
  }
  return toCrewItem(crew, await em.count(User, { crewId: crew.id }));
}

/** Only an empty crew goes: members are moved first, so no account loses its crew silently. */
export async function deleteCrew(em: EntityManager, id: string, actor: User) {
  const crew = await em.findOne(Crew, { id });
  if (!crew) throw AppError.notFound('Crew');
  const members = await em.count(User, { crewId: crew.id });
  if (members > 0) throw AppError.conflict(`This crew still has ${members} member${members === 1 ? '' : 's'}; move them to another crew first`);
  audit(em, { actorId: actor.id, action: 'crew.delete', recordType: 'crew', recordId: crew.id, before: { name: crew.name } });
  em.remove(crew);
  await em.flush();
}
