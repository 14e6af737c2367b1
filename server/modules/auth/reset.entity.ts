import { EntitySchema } from '@mikro-orm/core';

/** A password-reset request: one-time, short-lived; only the token's SHA-256 is stored. */
export class PasswordReset {
  id!: string;
  userId!: string;
  tokenHash!: string;
  expiresAt!: Date;
  createdAt: Date = new Date();
  usedAt: Date | null = null;
}

export const PasswordResetSchema = new EntitySchema<PasswordReset>({
  class: PasswordReset,
  tableName: 'password_resets',
  properties: {
    id: { type: 'string', primary: true },
    userId: { type: 'string', index: true },
    tokenHash: { type: 'string', unique: true },
    expiresAt: { type: 'Date' },
    createdAt: { type: 'Date' },
    usedAt: { type: 'Date', nullable: true },
  },
});
