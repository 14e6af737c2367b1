import type { AddressInfo } from 'node:net';
import { SMTPServer } from 'smtp-server';
import { simpleParser } from 'mailparser';
import type { MikroORM } from '@mikro-orm/sqlite';
import { OutboxMessage } from './outbox.entity.ts';

export interface MailCatcher {
  host: string;
  port: number;
  close: () => Promise<void>;
}

const MAX_MESSAGE_BYTES = 2 * 1024 * 1024;

/**
 * A local SMTP server on loopback that stores every message it receives in the outbox table.
 * It answers 250 only once the message is stored, so a send that resolved is already in the outbox.
 */
export async function startMailCatcher(orm: MikroORM, port = 0, host = '127.0.0.1'): Promise<MailCatcher> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    logger: false,
    // Loopback only: no reverse DNS lookup of the client (there may be no resolver at all).
    disableReverseLookup: true,
    banner: 'Roostline local mail catcher',
    size: MAX_MESSAGE_BYTES,
    closeTimeout: 2000,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then(async (mail) => {
          const to = session.envelope.rcptTo.map((r) => r.address).join(', ');
          const em = orm.em.fork();
          em.persist(
            em.create(OutboxMessage, {
              to,
              subject: mail.subject ?? '(no subject)',
              text: mail.text ?? '',
              html: typeof mail.html === 'string' ? mail.html : null,
              sentAt: new Date(),
              via: 'catcher',
            }),
          );
          await em.flush();
          callback();
        })
        .catch((err: Error) => callback(err));
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, host, () => {
      server.off('error', reject);
      resolve();
    });
  });
  server.on('error', (err) => console.error('mail catcher:', err.message));
  // The catcher never keeps the process alive on its own.
  server.server.unref();
  const address = server.server.address() as AddressInfo;
  return {
    host,
    port: address.port,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
