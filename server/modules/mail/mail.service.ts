import nodemailer, { type Transporter } from 'nodemailer';
import type { Request } from 'express';
import type { EntityManager } from '@mikro-orm/sqlite';
import type { AppContext } from '../../context.ts';
import { startMailCatcher, type MailCatcher } from './mail-catcher.ts';
import { OutboxMessage } from './outbox.entity.ts';

export interface MailMessage {
  to: string;
  subject: string;
  text: string;
  html: string;
  /** Values (one-time tokens) kept out of the local copy when mail goes to a real SMTP server. */
  secrets?: string[];
}

export interface Mailer {
  /** 'catcher' when mail goes to the built-in local catcher (no SMTP_URL), else 'smtp'. */
  via: 'catcher' | 'smtp';
  /** Resolves once the receiving server accepted the message (with the catcher: once it is in the outbox). */
  send: (message: MailMessage) => Promise<void>;
}

const REDACTED = '[removed from this copy]';
const mailers = new WeakMap<AppContext, Mailer>();

/** The app's one mailer; the first call (at app start, when the routers are built) starts the local catcher if needed. */
export function mailerFor(ctx: AppContext): Mailer {
  let mailer = mailers.get(ctx);
  if (!mailer) {
    mailer = ctx.config.smtpUrl ? smtpMailer(ctx, ctx.config.smtpUrl) : catcherMailer(ctx);
    mailers.set(ctx, mailer);
  }
  return mailer;
}

function catcherMailer(ctx: AppContext): Mailer {
  const catcher: Promise<MailCatcher> = startMailCatcher(ctx.orm, ctx.config.mailCatcherPort);
  catcher.catch((err: Error) => console.error(`The local mail catcher did not start: ${err.message}`));
  let transport: Transporter | null = null;
  ctx.onClose(async () => {
    transport?.close();
    await (await catcher.catch(() => null))?.close();
  });
  return {
    via: 'catcher',
    async send(message) {
      const { host, port } = await catcher;
      transport ??= nodemailer.createTransport({ host, port, secure: false, ignoreTLS: true });
      await transport.sendMail(envelope(ctx, message));
    },
  };
}

function smtpMailer(ctx: AppContext, smtpUrl: string): Mailer {
  const transport = nodemailer.createTransport(smtpUrl);
  ctx.onClose(() => transport.close());
  return {
    via: 'smtp',
    async send(message) {
      await transport.sendMail(envelope(ctx, message));
      // The outbox keeps a copy for the admins, without the one-time links (the database never holds a usable token).
      const redact = (s: string) => (message.secrets ?? []).reduce((acc, secret) => acc.split(secret).join(REDACTED), s);
      const em = ctx.orm.em.fork();
      em.persist(em.create(OutboxMessage, { to: message.to, subject: message.subject, text: redact(message.text), html: redact(message.html), sentAt: new Date(), via: 'smtp' }));
      await em.flush();
    },
  };
}

function envelope(ctx: AppContext, m: MailMessage) {
  return { from: ctx.config.mailFrom, to: m.to, subject: m.subject, text: m.text, html: m.html };
}

/** Where e-mailed links point: the configured public origin, else the origin the request came to. */
export function linkOrigin(ctx: AppContext, req: Request): string {
  if (ctx.config.publicOrigin) return ctx.config.publicOrigin.replace(/\/$/, '');
  return `${req.protocol}://${req.get('host')}`;
}

export async function listOutbox(em: EntityManager, limit: number) {
  const rows = await em.find(OutboxMessage, {}, { orderBy: { sentAt: 'desc', id: 'desc' }, limit });
  return rows.map((m) => ({ id: m.id, to: m.to, subject: m.subject, text: m.text, html: m.html, sentAt: m.sentAt.toISOString(), via: m.via }));
}
