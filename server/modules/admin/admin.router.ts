import { z } from 'zod';
import { crewSchema, invitationCreateSchema, userListQuerySchema, userUpdateSchema } from '#shared/schemas/accounts.ts';
import type { AppContext } from '../../context.ts';
import { currentUser, featureRouter } from '../../http/access.ts';
import { parse } from '../../http/errors.ts';
import { linkOrigin, listOutbox, mailerFor } from '../mail/mail.service.ts';
import { createInvitation, listPendingInvitations, resendInvitation, revokeInvitation } from '../auth/invitation.service.ts';
import {
  adminUserView,
  createCrew,
  deactivateUser,
  deleteCrew,
  getUser,
  listCrews,
  listUsers,
  reactivateUser,
  renameCrew,
  updateUser,
} from './admin.service.ts';

const ADMIN = ['admin'] as const;

/** Accounts, invitations, crews and the outbox: the admin role only. */
export function adminRouter(ctx: AppContext) {
  const r = featureRouter('/api/admin');
  // Built at app start, so the local mail catcher is listening before the first request.
  const mailer = mailerFor(ctx);

  r.get('/users', ADMIN, async (req, res) => {
    res.json(await listUsers(req.em, parse(userListQuerySchema, req.query)));
  });
  r.get('/users/:id', ADMIN, async (req, res) => {
    res.json(await adminUserView(req.em, await getUser(req.em, req.params.id as string)));
  });
  r.patch('/users/:id', ADMIN, async (req, res) => {
    const input = parse(userUpdateSchema, req.body);
    const user = await updateUser(req.em, await getUser(req.em, req.params.id as string), input, currentUser(req));
    res.json(await adminUserView(req.em, user));
  });
  r.post('/users/:id/deactivate', ADMIN, async (req, res) => {
    const user = await deactivateUser(req.em, ctx.lucia, await getUser(req.em, req.params.id as string), currentUser(req));
    res.json(await adminUserView(req.em, user));
  });
  r.post('/users/:id/reactivate', ADMIN, async (req, res) => {
    const user = await reactivateUser(req.em, await getUser(req.em, req.params.id as string), currentUser(req));
    res.json(await adminUserView(req.em, user));
  });

  r.get('/invitations', ADMIN, async (req, res) => {
    res.json({ items: await listPendingInvitations(req.em) });
  });
  r.post('/invitations', ADMIN, async (req, res) => {
    const input = parse(invitationCreateSchema, req.body);
    res.status(201).json(await createInvitation(req.em, mailer, input, currentUser(req), linkOrigin(ctx, req)));
  });
  r.post('/invitations/:id/resend', ADMIN, async (req, res) => {
    res.json(await resendInvitation(req.em, mailer, req.params.id as string, currentUser(req), linkOrigin(ctx, req)));
  });
  r.delete('/invitations/:id', ADMIN, async (req, res) => {
    await revokeInvitation(req.em, req.params.id as string, currentUser(req));
    res.status(204).end();
  });

  r.get('/crews', ADMIN, async (req, res) => {
    res.json({ items: await listCrews(req.em) });
  });
  r.post('/crews', ADMIN, async (req, res) => {
    res.status(201).json(await createCrew(req.em, parse(crewSchema, req.body), currentUser(req)));
  });
  r.patch('/crews/:id', ADMIN, async (req, res) => {
    res.json(await renameCrew(req.em, req.params.id as string, parse(crewSchema, req.body), currentUser(req)));
  });
  r.delete('/crews/:id', ADMIN, async (req, res) => {
    await deleteCrew(req.em, req.params.id as string, currentUser(req));
    res.status(204).end();
  });

  r.get('/outbox', ADMIN, async (req, res) => {
    const { limit } = parse(z.object({ limit: z.coerce.number().int().min(1).max(500).default(100) }), req.query);
    res.json({ items: await listOutbox(req.em, limit), via: mailer.via });
  });
  return r.router;
}
