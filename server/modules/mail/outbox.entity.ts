import { EntitySchema } from '@mikro-orm/core';

/** One e-mail the app sent: caught by the local catcher, or a redacted copy of one sent through SMTP_URL. */
export class OutboxMessage {
  id!: number;
  to!: string;
  subject!: string;
  text!: string;
  html: string | null = null;
  sentAt: Date = new Date();
  /** 'catcher' = received by the built-in local catcher; 'smtp' = handed to the SMTP_URL server (links redacted). */
  via!: 'catcher' | 'smtp';
}

export const OutboxMessageSchema = new EntitySchema<OutboxMessage>({
  class: OutboxMessage,
  tableName: 'outbox_messages',
  indexes: [{ properties: ['sentAt'] }],
  properties: {
    id: { type: 'number', primary: true, autoincrement: true },
    to: { type: 'string' },
    subject: { type: 'string' },
    text: { type: 'text' },
    html: { type: 'text', nullable: true },
    sentAt: { type: 'Date' },
    via: { type: 'string' },
  },
});
