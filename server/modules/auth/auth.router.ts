import { rateLimit } from 'express-rate-limit';
import { accountUpdateSchema, passwordChangeSchema, signInSchema } from '#shared/schemas/auth.ts';
import type { AppContext } from '../../context.ts';
import { currentUser, featureRouter } from '../../http/access.ts';
import { errorBody, parse } from '../../http/errors.ts';
import { audit } from '../audit/audit.service.ts';
import { changePassword, checkCredentials, toMe } from './auth.service.ts';
import { isCommonPassword } from './common-passwords.ts';
import { AppError } from '../../http/errors.ts';
import { sharedRateLimitStore } from '../../http/rate-limit-store.ts';

export function authRouter(ctx: AppContext) {
  const r = featureRouter('/api/auth');
  // Counts failed sign-ins only, per client address; a burst of failures gets 429 until the window passes.
  const limiter = rateLimit({
    windowMs: ctx.config.signInWindowMs,
    limit: ctx.config.signInBurst,
    skipSuccessfulRequests: true,
    // Counted in the database, so every process behind the load balancer sees the same count.
    store: sharedRateLimitStore(ctx, 'sign-in'),
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: (_req, res) => {
      res.status(429).json(errorBody('too_many_requests', 'Too many sign-in attempts; wait a few minutes and try again'));
    },
  });

  r.post('/sign-in', 'public', limiter, async (req, res) => {
    const { email, password } = parse(signInSchema, req.body);
    const user = await checkCredentials(req.em, email, password);
    const session = await ctx.lucia.createSession(user.id, {});
    user.lastSignInAt = new Date();
    await req.em.flush();
    res.append('Set-Cookie', ctx.lucia.createSessionCookie(session.id).serialize());
    res.json({ user: toMe(user) });
  });

  // The app's own "who is signed in?" probe: 200 with or without a session (`/api/me` answers 401 without one), so
  // opening the sign-in page is not an error in the browser's console.
  r.get('/session', 'public', (req, res) => {
    res.json({ user: req.user ? toMe(req.user) : null });
  });

  r.post('/sign-out', 'signed-in', async (req, res) => {
    await ctx.lucia.invalidateSession(req.sessionId!);
    res.append('Set-Cookie', ctx.lucia.createBlankSessionCookie().serialize());
    res.status(204).end();
  });
  return r.router;
}

export function meRouter(ctx: AppContext) {
  const r = featureRouter('/api/me');
  r.get('/', 'signed-in', (req, res) => {
    res.json({ user: toMe(currentUser(req)) });
  });

  r.patch('/', 'signed-in', async (req, res) => {
    const input = parse(accountUpdateSchema, req.body);
    const user = currentUser(req);
    const before = { name: user.name, unitSystem: user.unitSystem };
    Object.assign(user, input);
    audit(req.em, { actorId: user.id, action: 'account.update', recordType: 'user', recordId: user.id, before, after: input });
    await req.em.flush();
    res.json({ user: toMe(user) });
  });

  r.post('/password', 'signed-in', async (req, res) => {
    const { currentPassword, newPassword } = parse(passwordChangeSchema, req.body);
    if (isCommonPassword(newPassword)) throw AppError.field('newPassword', 'This password is too common; choose another');
    const user = currentUser(req);
    await changePassword(req.em, user, currentPassword, newPassword);
    // Other devices signed in with the old password are signed out; this one stays.
    const sessions = await ctx.lucia.getUserSessions(user.id);
    await Promise.all(sessions.filter((s) => s.id !== req.sessionId).map((s) => ctx.lucia.invalidateSession(s.id)));
    audit(req.em, { actorId: user.id, action: 'account.password-change', recordType: 'user', recordId: user.id });
    await req.em.flush();
    res.status(204).end();
  });
  return r.router;
}
