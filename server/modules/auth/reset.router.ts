import { rateLimit } from 'express-rate-limit';
import { requestPasswordResetSchema, resetPasswordSchema } from '#shared/schemas/accounts.ts';
import type { AppContext } from '../../context.ts';
import { featureRouter } from '../../http/access.ts';
import { errorBody, parse } from '../../http/errors.ts';
import { sharedRateLimitStore } from '../../http/rate-limit-store.ts';
import { linkOrigin, mailerFor } from '../mail/mail.service.ts';
import { requestPasswordReset, resetPassword, RESET_REQUESTED } from './reset.service.ts';

/** Password reset by e-mail (public). */
export function resetRouter(ctx: AppContext) {
  const r = featureRouter('/api/auth');
  const mailer = mailerFor(ctx);
  // Every request counts (not only failures): the answer never says whether an address exists.
  const limiter = rateLimit({
    windowMs: ctx.config.signInWindowMs,
    limit: ctx.config.signInBurst,
    // Counted in the database: every process behind the load balancer sees the same count.
    store: sharedRateLimitStore(ctx, 'password-reset'),
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: (_req, res) => {
      res.status(429).json(errorBody('too_many_requests', 'Too many reset requests; wait a few minutes and try again'));
    },
  });

  r.post('/request-password-reset', 'public', limiter, async (req, res) => {
    const { email } = parse(requestPasswordResetSchema, req.body);
    // The mail goes out in the background so the answer takes the same time for known and unknown addresses.
    await requestPasswordReset(req.em, mailer, email, linkOrigin(ctx, req));
    res.status(202).json({ message: RESET_REQUESTED });
  });

  r.post('/reset-password', 'public', async (req, res) => {
    const input = parse(resetPasswordSchema, req.body);
    await resetPassword(req.em, ctx.lucia, input);
    res.json({ message: 'Your password is changed. Sign in with the new one.' });
  });
  return r.router;
}
