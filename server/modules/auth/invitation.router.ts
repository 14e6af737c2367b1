import { z } from 'zod';
import { acceptInvitationSchema } from '#shared/schemas/accounts.ts';
import type { AppContext } from '../../context.ts';
import { featureRouter } from '../../http/access.ts';
import { parse } from '../../http/errors.ts';
import { toMe } from './auth.service.ts';
import { acceptInvitation, invitationForToken } from './invitation.service.ts';

/** The invitee's side of an invitation (public: the one-time token is the credential). */
export function invitationRouter(ctx: AppContext) {
  const r = featureRouter('/api/auth');

  r.get('/invitation', 'public', async (req, res) => {
    const { token } = parse(z.object({ token: z.string().min(1, 'The link has no token').max(200) }), req.query);
    const inv = await invitationForToken(req.em, token);
    res.json({ email: inv.email, name: inv.name, roles: inv.roles, expiresAt: inv.expiresAt.toISOString() });
  });

  // Sets the password, creates the account and signs it in on this device.
  r.post('/accept-invitation', 'public', async (req, res) => {
    const input = parse(acceptInvitationSchema, req.body);
    const user = await acceptInvitation(req.em, input);
    const session = await ctx.lucia.createSession(user.id, {});
    res.append('Set-Cookie', ctx.lucia.createSessionCookie(session.id).serialize());
    res.json({ user: toMe(user) });
  });
  return r.router;
}
