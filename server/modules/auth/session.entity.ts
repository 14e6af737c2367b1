import { EntitySchema } from '@mikro-orm/core';

export class Session {
  id!: string;
  userId!: string;
  expiresAt!: Date;
  createdAt: Date = new Date();
}

export const SessionSchema = new EntitySchema<Session>({
  class: Session,
  tableName: 'sessions',
  properties: {
    id: { type: 'string', primary: true },
    userId: { type: 'string', index: true },
    expiresAt: { type: 'Date' },
    createdAt: { type: 'Date' },
  },
});
