import { EntitySchema } from '@mikro-orm/core';
import type { Role } from '#shared/roles.ts';

/** An account offered by e-mail: the user record is created when the invitee sets a password. */
export class Invitation {
  id!: string;
  email!: string;
  name!: string;
  roles!: Role[];
  crewId: string | null = null;
  /** SHA-256 of the one-time token; the token itself is only in the e-mail. */
  tokenHash!: string;
  expiresAt!: Date;
  invitedById!: string;
  createdAt: Date = new Date();
  acceptedAt: Date | null = null;
  revokedAt: Date | null = null;
  userId: string | null = null;
}

export const InvitationSchema = new EntitySchema<Invitation>({
  class: Invitation,
  tableName: 'invitations',
  properties: {
    id: { type: 'string', primary: true },
    email: { type: 'string', index: true },
    name: { type: 'string' },
    roles: { type: 'json' },
    crewId: { type: 'string', nullable: true },
    tokenHash: { type: 'string', unique: true },
    expiresAt: { type: 'Date' },
    invitedById: { type: 'string' },
    createdAt: { type: 'Date' },
    acceptedAt: { type: 'Date', nullable: true },
    revokedAt: { type: 'Date', nullable: true },
    userId: { type: 'string', nullable: true },
  },
});
