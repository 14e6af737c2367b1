import type { MikroORM } from '@mikro-orm/sqlite';
import { Lucia, TimeSpan, type Adapter, type DatabaseSession, type DatabaseUser } from 'lucia';
import { Session } from './session.entity.ts';
import { User } from './user.entity.ts';

/** Lucia's seven-method adapter over the MikroORM entities; each call works in its own EntityManager fork. */
export function mikroOrmAdapter(orm: MikroORM): Adapter {
  const fork = () => orm.em.fork();
  const toDbSession = (s: Session): DatabaseSession => ({ id: s.id, userId: s.userId, expiresAt: s.expiresAt, attributes: {} });
  return {
    async getSessionAndUser(sessionId) {
      const em = fork();
      const session = await em.findOne(Session, { id: sessionId });
      if (!session) return [null, null];
      const user = await em.findOne(User, { id: session.userId });
      if (!user) return [null, null];
      const dbUser: DatabaseUser = { id: user.id, attributes: {} };
      return [toDbSession(session), dbUser];
    },
    async getUserSessions(userId) {
      return (await fork().find(Session, { userId })).map(toDbSession);
    },
    async setSession(session) {
      const em = fork();
      em.create(Session, { id: session.id, userId: session.userId, expiresAt: session.expiresAt, createdAt: new Date() });
      await em.flush();
    },
    async updateSessionExpiration(sessionId, expiresAt) {
      await fork().nativeUpdate(Session, { id: sessionId }, { expiresAt });
    },
    async deleteSession(sessionId) {
      await fork().nativeDelete(Session, { id: sessionId });
    },
    async deleteUserSessions(userId) {
      await fork().nativeDelete(Session, { userId });
    },
    async deleteExpiredSessions() {
      await fork().nativeDelete(Session, { expiresAt: { $lte: new Date() } });
    },
  };
}

export const SESSION_COOKIE = 'roostline_session';

export function createLucia(orm: MikroORM, secure: boolean) {
  return new Lucia(mikroOrmAdapter(orm), {
    sessionCookie: { name: SESSION_COOKIE, expires: false, attributes: { secure, sameSite: 'lax' } },
    sessionExpiresIn: new TimeSpan(12, 'h'),
  });
}
export type AppLucia = ReturnType<typeof createLucia>;
