import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';
import { DEMO_PASSWORD } from '../../server/seeders/demo-users.ts';
import { Invitation } from '../../server/modules/auth/invitation.entity.ts';
import { PasswordReset } from '../../server/modules/auth/reset.entity.ts';
import { AuditEntry } from '../../server/modules/audit/audit.entity.ts';
import { User } from '../../server/modules/auth/user.entity.ts';
import { OutboxMessage } from '../../server/modules/mail/outbox.entity.ts';
import { hashPassword } from '../../server/modules/auth/password.ts';

let t: TestApp;
let admin: Client;
beforeAll(async () => {
  t = await makeTestApp({ signInBurst: 1000 });
  admin = await t.as('admin');
});
afterAll(() => t.close());

interface Mail {
  to: string;
  subject: string;
  text: string;
  html: string;
  sentAt: string;
}

async function outbox(): Promise<Mail[]> {
  const res = await admin.get('/api/admin/outbox');
  expect(res.status).toBe(200);
  return res.body.items;
}

/** The newest mail to an address, waiting for background sends (the reset mail goes out after the answer). */
async function mailTo(to: string, subject: RegExp, timeoutMs = 5000): Promise<Mail> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const found = (await outbox()).find((m) => m.to === to && subject.test(m.subject));
    if (found) return found;
    if (Date.now() > deadline) throw new Error(`no mail to ${to} matching ${subject}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

function tokenFrom(mail: Mail, path: string): string {
  const m = mail.text.match(new RegExp(`${path}\\?token=([A-Za-z0-9_\\-%]+)`));
  if (!m) throw new Error(`no ${path} link in: ${mail.text}`);
  return decodeURIComponent(m[1]);
}

async function invite(email: string, name = 'Wren Halloway', roles = ['surveyor']) {
  const res = await admin.post('/api/admin/invitations', { email, name, roles });
  expect(res.status).toBe(201);
  const mail = await mailTo(email, /account/i);
  return { res, mail, token: tokenFrom(mail, '/accept-invitation') };
}

describe('invitations', () => {
  it('when an admin invites, then the mail reaches the local catcher, the invitee sets a password, and the account signs in', async () => {
    const { res, mail, token } = await invite('wren@harrowvale.test');
    expect(res.body).toMatchObject({ email: 'wren@harrowvale.test', name: 'Wren Halloway', roles: ['surveyor'], mailSent: true });
    // The mail has both parts, from Roostline, with the link on the app's own origin.
    expect(mail.subject).toBe('Your Roostline account is ready');
    expect(mail.text).toContain('Hello Wren Halloway');
    expect(mail.text).toContain('http://roostline.test:3000/accept-invitation?token=');
    expect(mail.html).toContain('<a href="http://roostline.test:3000/accept-invitation?token=');
    expect(new Date(mail.sentAt).getTime()).toBeGreaterThan(Date.now() - 60_000);
    // Only the token's hash is stored.
    const inv = await t.orm.em.fork().findOneOrFail(Invitation, { email: 'wren@harrowvale.test' });
    expect(inv.tokenHash).toMatch(/^[0-9a-f]{64}$/);
    expect(inv.tokenHash).not.toContain(token);

    const anon = t.client();
    const shown = await anon.get(`/api/auth/invitation?token=${encodeURIComponent(token)}`);
    expect(shown.status).toBe(200);
    expect(shown.body).toMatchObject({ email: 'wren@harrowvale.test', name: 'Wren Halloway', roles: ['surveyor'] });

    const accepted = await anon.post('/api/auth/accept-invitation', { token, password: 'kestrel-over-the-ridge' });
    expect(accepted.status).toBe(200);
    expect(accepted.body.user).toMatchObject({ email: 'wren@harrowvale.test', roles: ['surveyor'] });
    // Accepting signs this device in …
    expect((await anon.get('/api/me')).body.user.email).toBe('wren@harrowvale.test');
    // … and the password works for a fresh sign-in.
    const signIn = await t.client().post('/api/auth/sign-in', { email: 'wren@harrowvale.test', password: 'kestrel-over-the-ridge' });
    expect(signIn.status).toBe(200);

    const entries = await t.orm.em.fork().find(AuditEntry, { action: { $in: ['invitation.create', 'invitation.accept'] } });
    expect(entries.map((e) => e.action).sort()).toEqual(['invitation.accept', 'invitation.create']);
  });

  it('when a token is used twice, then the second use gets 400', async () => {
    const { token } = await invite('reuse@harrowvale.test');
    expect((await t.client().post('/api/auth/accept-invitation', { token, password: 'first-long-secret' })).status).toBe(200);
    const again = await t.client().post('/api/auth/accept-invitation', { token, password: 'second-long-secret' });
    expect(again.status).toBe(400);
    expect(again.body.error.issues[0].path).toBe('token');
    expect((await t.client().get(`/api/auth/invitation?token=${token}`)).status).toBe(400);
    // The first password still holds.
    expect((await t.client().post('/api/auth/sign-in', { email: 'reuse@harrowvale.test', password: 'first-long-secret' })).status).toBe(200);
  });

  it('when the invitation has expired, then accepting gets 400 and creates no account', async () => {
    const { token } = await invite('late@harrowvale.test');
    const em = t.orm.em.fork();
    await em.nativeUpdate(Invitation, { email: 'late@harrowvale.test' }, { expiresAt: new Date(Date.now() - 1000) });
    const res = await t.client().post('/api/auth/accept-invitation', { token, password: 'too-late-secret-1' });
    expect(res.status).toBe(400);
    expect(await em.count(User, { email: 'late@harrowvale.test' })).toBe(0);
  });

  it('when the token is forged or missing, then 400 naming the field', async () => {
    const forged = await t.client().post('/api/auth/accept-invitation', { token: 'A'.repeat(43), password: 'forged-long-secret' });
    expect(forged.status).toBe(400);
    expect(forged.body.error.issues[0].path).toBe('token');
    const missing = await t.client().post('/api/auth/accept-invitation', { password: 'forged-long-secret' });
    expect(missing.status).toBe(400);
    expect(missing.body.error.issues.map((i: { path: string }) => i.path)).toContain('token');
  });

  it('when the password is short or common, then 400 on password and the token still works', async () => {
    const { token } = await invite('weak@harrowvale.test');
    const short = await t.client().post('/api/auth/accept-invitation', { token, password: 'short' });
    expect(short.status).toBe(400);
    expect(short.body.error.issues[0].path).toBe('password');
    const common = await t.client().post('/api/auth/accept-invitation', { token, password: 'password123' });
    expect(common.status).toBe(400);
    expect(common.body.error.issues[0].path).toBe('password');
    expect((await t.client().post('/api/auth/accept-invitation', { token, password: 'heron-by-the-weir' })).status).toBe(200);
  });

  it('when an address is invited again, then the earlier link stops working and the new one works', async () => {
    const first = await invite('twice@harrowvale.test');
    await new Promise((r) => setTimeout(r, 5));
    const res = await admin.post('/api/admin/invitations', { email: 'twice@harrowvale.test', name: 'Twice', roles: ['planner'] });
    expect(res.status).toBe(201);
    const mails = (await outbox()).filter((m) => m.to === 'twice@harrowvale.test');
    expect(mails).toHaveLength(2);
    const second = tokenFrom(mails[0], '/accept-invitation');
    expect(second).not.toBe(first.token);
    expect((await t.client().post('/api/auth/accept-invitation', { token: first.token, password: 'old-link-secret' })).status).toBe(400);
    expect((await t.client().post('/api/auth/accept-invitation', { token: second, password: 'new-link-secret' })).status).toBe(200);
  });

  it('when the address already has an account or the input is bad, then 409 or 400 naming the field', async () => {
    const dup = await admin.post('/api/admin/invitations', { email: 'planner@roostline.test', name: 'Dup', roles: ['planner'] });
    expect(dup.status).toBe(409);
    const bad = await admin.post('/api/admin/invitations', { email: 'nope', name: '', roles: ['pilot'] });
    expect(bad.status).toBe(400);
    expect(bad.body.error.issues.map((i: { path: string }) => i.path)).toEqual(expect.arrayContaining(['email', 'name']));
    const noRole = await admin.post('/api/admin/invitations', { email: 'x@harrowvale.test', name: 'X', roles: [] });
    expect(noRole.body.error.issues[0].path).toBe('roles');
  });

  it('when an admin sends an invitation again, then a new link goes out and the old one stops working', async () => {
    const { token } = await invite('resend@harrowvale.test');
    const pending = (await admin.get('/api/admin/invitations')).body.items.find((i: { email: string }) => i.email === 'resend@harrowvale.test');
    const res = await admin.post(`/api/admin/invitations/${pending.id}/resend`);
    expect(res.status).toBe(200);
    expect(res.body.mailSent).toBe(true);
    const mails = (await outbox()).filter((m) => m.to === 'resend@harrowvale.test');
    expect(mails).toHaveLength(2);
    const fresh = tokenFrom(mails[0], '/accept-invitation');
    expect(fresh).not.toBe(token);
    expect((await t.client().post('/api/auth/accept-invitation', { token, password: 'stale-link-secret' })).status).toBe(400);
    expect((await t.client().post('/api/auth/accept-invitation', { token: fresh, password: 'fresh-link-secret' })).status).toBe(200);
    expect((await admin.post(`/api/admin/invitations/${pending.id}/resend`)).status).toBe(404);
  });

  it('when an admin revokes a pending invitation, then its link stops working', async () => {
    const { token } = await invite('revoked@harrowvale.test');
    const pending = (await admin.get('/api/admin/invitations')).body.items.find((i: { email: string }) => i.email === 'revoked@harrowvale.test');
    expect(pending).toBeDefined();
    expect((await admin.delete(`/api/admin/invitations/${pending.id}`)).status).toBe(204);
    expect((await t.client().post('/api/auth/accept-invitation', { token, password: 'revoked-long-secret' })).status).toBe(400);
  });
});

describe('password reset', () => {
  it('when a user asks for a reset, then the mail carries a one-time link, the new password works and old sessions end', async () => {
    const old = await t.as('planner');
    expect((await old.get('/api/me')).status).toBe(200);
    const res = await t.client().post('/api/auth/request-password-reset', { email: 'Planner@roostline.test' });
    expect(res.status).toBe(202);
    const mail = await mailTo('planner@roostline.test', /reset/i);
    expect(mail.subject).toBe('Reset your Roostline password');
    expect(mail.html).toContain('/reset-password?token=');
    const token = tokenFrom(mail, '/reset-password');

    const weak = await t.client().post('/api/auth/reset-password', { token, password: 'qwertyuiop' });
    expect(weak.status).toBe(400);
    expect(weak.body.error.issues[0].path).toBe('password');
    expect((await t.client().post('/api/auth/reset-password', { token, password: 'lantern-on-the-pylon' })).status).toBe(200);

    expect((await old.get('/api/me')).status).toBe(401);
    expect((await t.client().post('/api/auth/sign-in', { email: 'planner@roostline.test', password: DEMO_PASSWORD })).status).toBe(401);
    expect((await t.client().post('/api/auth/sign-in', { email: 'planner@roostline.test', password: 'lantern-on-the-pylon' })).status).toBe(200);
    // Used once, never again.
    expect((await t.client().post('/api/auth/reset-password', { token, password: 'another-long-secret' })).status).toBe(400);
    const entries = await t.orm.em.fork().find(AuditEntry, { action: 'account.password-reset' });
    expect(entries).toHaveLength(1);
    // Back to the demo password for the other tests.
    await t.orm.em.fork().nativeUpdate(User, { email: 'planner@roostline.test' }, { passwordHash: await hashPassword(DEMO_PASSWORD) });
  });

  it('when the e-mail is unknown, then the answer is the same and no mail goes out', async () => {
    const toSafety = (mails: Mail[]) => mails.filter((m) => m.to === 'safety@roostline.test').length;
    const before = toSafety(await outbox());
    const known = await t.client().post('/api/auth/request-password-reset', { email: 'safety@roostline.test' });
    const unknown = await t.client().post('/api/auth/request-password-reset', { email: 'nobody@harrowvale.test' });
    expect(unknown.status).toBe(known.status);
    expect(unknown.body).toEqual(known.body);
    await mailTo('safety@roostline.test', /reset/i);
    const after = await outbox();
    expect(toSafety(after)).toBe(before + 1);
    expect(after.some((m) => m.to === 'nobody@harrowvale.test')).toBe(false);
  });

  it('when a reset link has expired or is forged, then 400', async () => {
    const em = t.orm.em.fork();
    await em.nativeUpdate(PasswordReset, {}, { createdAt: new Date(0) });
    await t.client().post('/api/auth/request-password-reset', { email: 'surveyor@roostline.test' });
    const token = tokenFrom(await mailTo('surveyor@roostline.test', /reset/i), '/reset-password');
    await em.nativeUpdate(PasswordReset, { usedAt: null }, { expiresAt: new Date(Date.now() - 1000) });
    expect((await t.client().post('/api/auth/reset-password', { token, password: 'expired-long-secret' })).status).toBe(400);
    expect((await t.client().post('/api/auth/reset-password', { token: 'forged-token-value', password: 'forged-long-secret' })).status).toBe(400);
    expect((await t.client().post('/api/auth/sign-in', { email: 'surveyor@roostline.test', password: DEMO_PASSWORD })).status).toBe(200);
  });

  it('when resets are asked for in a burst, then 429', async () => {
    const own = await makeTestApp({ signInBurst: 3 });
    const c = own.client();
    const statuses: number[] = [];
    for (let i = 0; i < 5; i++) statuses.push((await c.post('/api/auth/request-password-reset', { email: `n${i}@harrowvale.test` })).status);
    expect(statuses).toEqual([202, 202, 202, 429, 429]);
    await own.close();
  });
});

describe('users and crews', () => {
  async function userId(email: string) {
    return (await t.orm.em.fork().findOneOrFail(User, { email })).id;
  }

  it('when an admin lists users, then search, role, crew and active filters apply and last sign-in shows', async () => {
    const all = await admin.get('/api/admin/users');
    expect(all.status).toBe(200);
    expect(all.body.total).toBeGreaterThanOrEqual(4);
    const me = all.body.items.find((u: { email: string }) => u.email === 'admin@roostline.test');
    expect(me.lastSignInAt).toEqual(expect.any(String));
    const surveyors = await admin.get('/api/admin/users?role=surveyor');
    expect(surveyors.body.items.every((u: { roles: string[] }) => u.roles.includes('surveyor'))).toBe(true);
    const tomas = surveyors.body.items.find((u: { email: string }) => u.email === 'surveyor@roostline.test');
    expect(tomas.crewName).toBe('North Ridge crew');
    const byCrew = await admin.get(`/api/admin/users?crewId=${tomas.crewId}`);
    expect(byCrew.body.items.map((u: { email: string }) => u.email)).toEqual(['surveyor@roostline.test']);
    const search = await admin.get('/api/admin/users?q=okonkwo');
    expect(search.body.items.map((u: { email: string }) => u.email)).toEqual(['safety@roostline.test']);
    expect((await admin.get('/api/admin/users?active=maybe')).status).toBe(400);
  });

  it('when an admin deactivates a user, then their sessions end at once, sign-in is refused, and reactivation lets them back', async () => {
    const safety = await t.as('safety');
    const other = await t.as('safety');
    expect((await safety.get('/api/me')).status).toBe(200);
    const id = await userId('safety@roostline.test');
    const res = await admin.post(`/api/admin/users/${id}/deactivate`);
    expect(res.status).toBe(200);
    expect(res.body.active).toBe(false);
    expect((await safety.get('/api/me')).status).toBe(401);
    expect((await other.get('/api/me')).status).toBe(401);
    const right = await t.client().post('/api/auth/sign-in', { email: 'safety@roostline.test', password: DEMO_PASSWORD });
    expect(right.status).toBe(401);
    // The right password learns the account is deactivated; a wrong one keeps the generic answer (api.md, Accounts).
    expect(right.body.error.message).toMatch(/deactivated/);
    const wrong = await t.client().post('/api/auth/sign-in', { email: 'safety@roostline.test', password: 'not-the-password-1' });
    expect(wrong.status).toBe(401);
    expect(wrong.body.error.message).toBe('E-mail or password is incorrect');
    expect(wrong.body.error.message).not.toMatch(/deactivated/);
    expect((await admin.get('/api/admin/users?active=false')).body.items.map((u: { email: string }) => u.email)).toContain('safety@roostline.test');
    expect((await admin.post(`/api/admin/users/${id}/reactivate`)).body.active).toBe(true);
    expect((await t.client().post('/api/auth/sign-in', { email: 'safety@roostline.test', password: DEMO_PASSWORD })).status).toBe(200);
    const actions = (await t.orm.em.fork().find(AuditEntry, { recordId: id, recordType: 'user' })).map((e) => e.action);
    expect(actions).toEqual(expect.arrayContaining(['user.deactivate', 'user.reactivate']));
  });

  it('when the last active admin would lose the role or be deactivated, then 409, and with a second admin it works', async () => {
    const adminId = await userId('admin@roostline.test');
    const demote = await admin.patch(`/api/admin/users/${adminId}`, { roles: ['planner'] });
    expect(demote.status).toBe(409);
    expect((await admin.post(`/api/admin/users/${adminId}/deactivate`)).status).toBe(409);
    // A second admin appears; now the first may step down, and the second cannot then be removed.
    const plannerId = await userId('planner@roostline.test');
    expect((await admin.patch(`/api/admin/users/${plannerId}`, { roles: ['planner', 'admin'] })).status).toBe(200);
    const stepDown = await admin.patch(`/api/admin/users/${adminId}`, { roles: ['admin', 'safety'] });
    expect(stepDown.status).toBe(200);
    const planner = await t.as('planner');
    expect((await planner.post(`/api/admin/users/${adminId}/deactivate`)).status).toBe(200);
    expect((await planner.patch(`/api/admin/users/${plannerId}`, { roles: ['planner'] })).status).toBe(409);
    expect((await planner.post(`/api/admin/users/${adminId}/reactivate`)).status).toBe(200);
    expect((await planner.patch(`/api/admin/users/${plannerId}`, { roles: ['planner'] })).status).toBe(200);
    admin = await t.as('admin');
    const upd = await t.orm.em.fork().find(AuditEntry, { action: 'user.update', recordId: plannerId });
    expect(upd[0].before).toEqual({ roles: ['planner'] });
    expect(upd[0].after).toEqual({ roles: ['planner', 'admin'] });
  });

  it('when two admins remove each other at the same moment, then exactly one change goes through', async () => {
    const plannerId = await userId('planner@roostline.test');
    const adminId = await userId('admin@roostline.test');
    expect((await admin.patch(`/api/admin/users/${plannerId}`, { roles: ['planner', 'admin'] })).status).toBe(200);
    const planner = await t.as('planner');
    const [a, b] = await Promise.all([
      admin.patch(`/api/admin/users/${plannerId}`, { roles: ['planner'] }),
      planner.patch(`/api/admin/users/${adminId}`, { roles: ['safety'] }),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 409]);
    const admins = (await t.orm.em.fork().find(User, { active: true })).filter((u) => u.roles.includes('admin'));
    expect(admins).toHaveLength(1);
    // Put the demo roles back for the other tests.
    const em = t.orm.em.fork();
    await em.nativeUpdate(User, { id: adminId }, { roles: ['admin'] });
    await em.nativeUpdate(User, { id: plannerId }, { roles: ['planner'] });
  });

  it('when an admin edits name and crew, then the change and its audit entry land', async () => {
    const crew = await admin.post('/api/admin/crews', { name: 'Willow Ford crew' });
    expect(crew.status).toBe(201);
    expect((await admin.post('/api/admin/crews', { name: 'willow ford crew' })).status).toBe(409);
    const id = await userId('surveyor@roostline.test');
    const res = await admin.patch(`/api/admin/users/${id}`, { name: 'Tomas V.', crewId: crew.body.id });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ name: 'Tomas V.', crewId: crew.body.id, crewName: 'Willow Ford crew' });
    expect((await admin.patch(`/api/admin/users/${id}`, { crewId: 'no-such-crew' })).body.error.issues[0].path).toBe('crewId');
    const crews = (await admin.get('/api/admin/crews')).body.items;
    expect(crews.find((c: { id: string }) => c.id === crew.body.id).memberCount).toBe(1);
    // A crew with members cannot be deleted; once empty it can.
    expect((await admin.delete(`/api/admin/crews/${crew.body.id}`)).status).toBe(409);
    expect((await admin.patch(`/api/admin/crews/${crew.body.id}`, { name: 'Willow Ford north' })).body.name).toBe('Willow Ford north');
    await admin.patch(`/api/admin/users/${id}`, { crewId: null });
    expect((await admin.delete(`/api/admin/crews/${crew.body.id}`)).status).toBe(204);
    const actions = (await t.orm.em.fork().find(AuditEntry, { recordType: 'crew', recordId: crew.body.id }, { orderBy: { id: 'asc' } })).map((e) => e.action);
    expect(actions).toEqual(['crew.create', 'crew.update', 'crew.delete']);
  });

  it('when a non-admin calls the admin API, then 403; anonymous 401', async () => {
    const surveyor = await t.as('surveyor');
    expect((await surveyor.get('/api/admin/users')).status).toBe(403);
    expect((await surveyor.post('/api/admin/invitations', { email: 'a@b.test', name: 'A', roles: ['admin'] })).status).toBe(403);
    expect((await t.client().get('/api/admin/outbox')).status).toBe(401);
  });
});

describe('audit log', () => {
  it('when an admin filters the log, then entries show the actor name and before → after', async () => {
    const res = await admin.get('/api/audit?recordType=user&action=user.update');
    expect(res.status).toBe(200);
    expect(res.body.total).toBeGreaterThan(0);
    const entry = res.body.items[0];
    expect(entry).toMatchObject({ action: 'user.update', recordType: 'user', actorName: expect.any(String) });
    expect(entry.before).toBeDefined();
    expect(entry.after).toBeDefined();
    const byActor = await admin.get(`/api/audit?userId=${entry.actorId}`);
    expect(byActor.body.items.every((e: { actorId: string }) => e.actorId === entry.actorId)).toBe(true);
    const today = new Date().toISOString().slice(0, 10);
    expect((await admin.get(`/api/audit?from=${today}&to=${today}`)).body.total).toBeGreaterThan(0);
    expect((await admin.get('/api/audit?from=2000-01-01&to=2000-01-02')).body.total).toBe(0);
    expect((await admin.get('/api/audit?from=yesterday')).status).toBe(400);
    const facets = (await admin.get('/api/audit/facets')).body;
    expect(facets.actions).toEqual(expect.arrayContaining(['user.update', 'crew.create']));
  });

  it('when safety reads the log, then only span-related entries; a user filter is 403; other roles 403', async () => {
    const em = t.orm.em.fork();
    em.persist(em.create(AuditEntry, { at: new Date(), actorId: null, action: 'zone.create', recordType: 'zone', recordId: 'z1', before: null, after: { name: 'Weir pool' } }));
    await em.flush();
    const safety = await t.as('safety');
    const res = await safety.get('/api/audit');
    expect(res.status).toBe(200);
    expect(res.body.items.length).toBeGreaterThan(0);
    expect(res.body.items.every((e: { recordType: string }) => e.recordType !== 'user' && e.recordType !== 'crew' && e.recordType !== 'invitation')).toBe(true);
    expect((await safety.get('/api/audit?recordType=user')).status).toBe(403);
    expect((await (await t.as('planner')).get('/api/audit')).status).toBe(403);
    expect((await (await t.as('surveyor')).get('/api/audit')).status).toBe(403);
  });

  it('when mail goes out, then the outbox lists it newest first', async () => {
    const items = await outbox();
    expect(items.length).toBeGreaterThan(2);
    const times = items.map((m) => new Date(m.sentAt).getTime());
    expect([...times].sort((a, b) => b - a)).toEqual(times);
    expect(await t.orm.em.fork().count(OutboxMessage, { via: 'catcher' })).toBe(items.length);
  });
});
