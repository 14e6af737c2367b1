import { EntitySchema } from '@mikro-orm/core';
import type { Role } from '#shared/roles.ts';
import type { UnitSystem } from '#shared/schemas/auth.ts';

export class User {
  id!: string;
  email!: string;
  name!: string;
  passwordHash!: string | null;
  roles!: Role[];
  unitSystem: UnitSystem = 'metric';
  crewId: string | null = null;
  active = true;
  createdAt: Date = new Date();
  lastSignInAt: Date | null = null;
}

export const UserSchema = new EntitySchema<User>({
  class: User,
  tableName: 'users',
  properties: {
    id: { type: 'string', primary: true },
    email: { type: 'string', unique: true },
    name: { type: 'string' },
    passwordHash: { type: 'string', nullable: true },
    roles: { type: 'json' },
    unitSystem: { type: 'string', default: 'metric' },
    crewId: { type: 'string', nullable: true },
    active: { type: 'boolean', default: true },
    createdAt: { type: 'Date' },
    lastSignInAt: { type: 'Date', nullable: true },
  },
});

export class Crew {
  id!: string;
  name!: string;
  createdAt: Date = new Date();
}

export const CrewSchema = new EntitySchema<Crew>({
  class: Crew,
  tableName: 'crews',
  properties: {
    id: { type: 'string', primary: true },
    name: { type: 'string', unique: true },
    createdAt: { type: 'Date' },
  },
});
