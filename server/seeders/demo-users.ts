import type { EntityManager } from '@mikro-orm/sqlite';
import { generateIdFromEntropySize } from 'lucia';
import type { Role } from '#shared/roles.ts';
import { Crew, User } from '../modules/auth/user.entity.ts';
import { hashPassword } from '../modules/auth/password.ts';

export const DEMO_PASSWORD = 'roostline-demo';

// The invented crew and people of the demo scenario (Harrow Vale Power Cooperative).
export const DEMO_USERS: { email: string; name: string; roles: Role[]; crew?: string }[] = [
  { email: 'admin@roostline.test', name: 'Imogen Thale', roles: ['admin'] },
  { email: 'safety@roostline.test', name: 'Bram Okonkwo-Reyes', roles: ['safety'] },
  { email: 'planner@roostline.test', name: 'Sunniva Marsh', roles: ['planner'] },
  { email: 'surveyor@roostline.test', name: 'Tomas Velloway', roles: ['surveyor'], crew: 'North Ridge crew' },
];

export async function seedDemoUsers(em: EntityManager) {
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  const crews = new Map<string, Crew>();
  for (const u of DEMO_USERS) {
    let crewId: string | null = null;
    if (u.crew) {
      let crew = crews.get(u.crew);
      if (!crew) {
        crew = em.create(Crew, { id: generateIdFromEntropySize(10), name: u.crew, createdAt: new Date() });
        crews.set(u.crew, crew);
      }
      crewId = crew.id;
    }
    em.create(User, {
      id: generateIdFromEntropySize(10),
      email: u.email,
      name: u.name,
      passwordHash,
      roles: u.roles,
      unitSystem: 'metric',
      crewId,
      active: true,
      createdAt: new Date(),
      lastSignInAt: null,
    });
  }
  await em.flush();
}
