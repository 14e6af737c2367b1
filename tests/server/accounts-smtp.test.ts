import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { SMTPServer } from 'smtp-server';
import { simpleParser, type ParsedMail } from 'mailparser';
import { makeTestApp, type TestApp } from './helpers.ts';

// With SMTP_URL set, mail goes to that server; the outbox keeps a copy without the one-time link.
let relay: SMTPServer;
const received: { to: string[]; mail: ParsedMail }[] = [];
let t: TestApp;

beforeAll(async () => {
  relay = new SMTPServer({
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    logger: false,
    disableReverseLookup: true,
    onData(stream, session, cb) {
      simpleParser(stream)
        .then((mail) => {
          received.push({ to: session.envelope.rcptTo.map((r) => r.address), mail });
          cb();
        })
        .catch(cb);
    },
  });
  await new Promise<void>((resolve) => relay.listen(0, '127.0.0.1', resolve));
  const port = (relay.server.address() as AddressInfo).port;
  t = await makeTestApp({ smtpUrl: `smtp://127.0.0.1:${port}`, publicOrigin: 'https://roostline.harrowvale.test', signInBurst: 1000 });
});
afterAll(async () => {
  await t.close();
  await new Promise<void>((resolve) => relay.close(() => resolve()));
});

describe('mail through SMTP_URL', () => {
  it('when SMTP_URL is set, then the invitation reaches that server from Roostline with the public origin, and the outbox copy has no usable token', async () => {
    const admin = await t.as('admin');
    const res = await admin.post('/api/admin/invitations', { email: 'relay@harrowvale.test', name: 'Ines Quarry', roles: ['planner'] });
    expect(res.status).toBe(201);
    expect(res.body.mailSent).toBe(true);
    expect(received).toHaveLength(1);
    const { to, mail } = received[0];
    expect(to).toEqual(['relay@harrowvale.test']);
    expect(mail.from?.text).toContain('Roostline');
    expect(mail.subject).toBe('Your Roostline account is ready');
    expect(typeof mail.html).toBe('string');
    const token = mail.text!.match(/accept-invitation\?token=([A-Za-z0-9_-]+)/)![1];
    expect(mail.text).toContain('https://roostline.harrowvale.test/accept-invitation?token=');

    const outbox = await admin.get('/api/admin/outbox');
    expect(outbox.body.via).toBe('smtp');
    expect(outbox.body.items).toHaveLength(1);
    const copy = outbox.body.items[0];
    expect(copy.to).toBe('relay@harrowvale.test');
    expect(copy.text).not.toContain(token);
    expect(copy.html).not.toContain(token);
    expect(copy.text).toContain('[removed from this copy]');
    // The real link still works.
    expect((await t.client().post('/api/auth/accept-invitation', { token, password: 'quarry-lane-lantern' })).status).toBe(200);
  });

  it('when the mail server refuses, then the invitation is kept, the answer says the mail did not go, and the outbox holds no copy', async () => {
    const broken = await makeTestApp({ smtpUrl: 'smtp://127.0.0.1:1' });
    const b = await broken.as('admin');
    const res = await b.post('/api/admin/invitations', { email: 'down@harrowvale.test', name: 'Down', roles: ['surveyor'] });
    expect(res.status).toBe(201);
    expect(res.body.mailSent).toBe(false);
    expect((await b.get('/api/admin/invitations')).body.items.map((i: { email: string }) => i.email)).toContain('down@harrowvale.test');
    expect((await b.get('/api/admin/outbox')).body.items).toHaveLength(0);
    await broken.close();
  });
});
