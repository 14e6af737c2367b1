import type { MikroORM } from '@mikro-orm/sqlite';
import { Lucia, TimeSpan, type Adapter, type DatabaseSession, type DatabaseUser, type User as LuciaUser } from 'lucia';
import { Session } from './session.entity.ts';
import { sql } from '../../sql/query.ts';

/** A users row as the database gives it (column names, the driver's own values), for `em.map(User, row)`. */
export type UserRow = Record<string, unknown> & { id: string };

/**
 * The users row read with the session (every request checks one): the session middleware maps it into the
 * request's EntityManager instead of loading the user a second time.
 */
export const userRowOf = (user: LuciaUser): UserRow => (user as unknown as { row: UserRow }).row;

/** Lucia's seven-method adapter over the MikroORM entities; each call works in its own EntityManager fork. */
export function mikroOrmAdapter(orm: MikroORM): Adapter {
  const fork = () => orm.em.fork();
  const toDbSession = (s: Pick<Session, 'id' | 'userId' | 'expiresAt'>): DatabaseSession => ({ id: s.id, userId: s.userId, expiresAt: s.expiresAt, attributes: {} });
  return {
    // Two bound statements, no entity loads: this runs on every signed-in request.
    async getSessionAndUser(sessionId) {
      const em = fork();
      const session = await sql.get<{ id: string; user_id: string; expires_at: number | string | Date }>(em, 'select id, user_id, expires_at from sessions where id = ?', [sessionId]);
      if (!session) return [null, null];
      const row = await sql.get<UserRow>(em, 'select * from users where id = ?', [session.user_id]);
      if (!row) return [null, null];
      // SQLite keeps the time as epoch milliseconds, PostgreSQL's driver gives a Date.
      const at = session.expires_at;
      const expiresAt = new Date(typeof at === 'string' && /^\d+$/.test(at) ? Number(at) : at);
      const dbUser: DatabaseUser = { id: row.id, attributes: { row } };
      return [toDbSession({ id: session.id, userId: session.user_id, expiresAt }), dbUser];
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
    getUserAttributes: (attributes) => ({ row: (attributes as { row: UserRow }).row }),
  });
}
export type AppLucia = ReturnType<typeof createLucia>;
