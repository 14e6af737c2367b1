import type { RequestHandler } from 'express';
import { verifyRequestOrigin } from 'lucia';
import type { AppContext } from '../context.ts';
import { User } from '../modules/auth/user.entity.ts';
import { userRowOf } from '../modules/auth/lucia.ts';
import { AppError } from './errors.ts';

/** Forks the EntityManager and resolves the session cookie to a user (an inactive user has no session). */
export function sessionMiddleware(ctx: AppContext): RequestHandler {
  return async (req, res, next) => {
    req.em = ctx.orm.em.fork();
    const sessionId = ctx.lucia.readSessionCookie(req.headers.cookie ?? '');
    if (!sessionId) return next();
    const { session, user: found } = await ctx.lucia.validateSession(sessionId);
    if (!session) {
      res.append('Set-Cookie', ctx.lucia.createBlankSessionCookie().serialize());
      return next();
    }
    // The users row came with the session: mapped into the request's EntityManager, it is a managed entity as a load would give.
    const user = req.em.map(User, userRowOf(found));
    if (!user.active) {
      await ctx.lucia.invalidateSession(session.id);
      res.append('Set-Cookie', ctx.lucia.createBlankSessionCookie().serialize());
      return next();
    }
    if (session.fresh) res.append('Set-Cookie', ctx.lucia.createSessionCookie(session.id).serialize());
    req.user = user;
    req.sessionId = session.id;
    next();
  };
}

const STATE_CHANGING = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

/** State-changing requests must come from the app's own origin (CSRF defence next to SameSite=Lax). */
export function originCheck(ctx: AppContext): RequestHandler {
  return (req, _res, next) => {
    if (!STATE_CHANGING.has(req.method)) return next();
    const origin = req.get('origin');
    const hosts = [req.get('host') ?? ''];
    if (ctx.config.publicOrigin) hosts.push(new URL(ctx.config.publicOrigin).host);
    if (!origin || !verifyRequestOrigin(origin, hosts)) {
      throw AppError.forbidden('Request origin not allowed');
    }
    next();
  };
}
