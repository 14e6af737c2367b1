import type { EntityManager, MikroORM } from '@mikro-orm/sqlite';
import { User } from '../modules/auth/user.entity.ts';
import { seedDemoUsers } from './demo-users.ts';
import { seedDemoInventory } from './demo-inventory.ts';
import { seedDemoLoadSeries } from './demo-load-series.ts';
import { seedDemoMission, seedDemoPermissions } from './demo-missions.ts';
import { seedDemoDecisions } from './demo-decisions.ts';

/** Seeds the demo scenario into an empty database (no users yet); returns whether it did. */
export async function seedDemoIfEmpty(orm: MikroORM): Promise<boolean> {
  const em = orm.em.fork();
  if ((await em.count(User, {})) > 0) return false;
  await seedDemoUsers(em);
  await seedDemoScenario(em);
  return true;
}

/** Everything of the demo after its accounts: the inventory, a metered line, the owner's permissions, the demo mission. */
export async function seedDemoScenario(em: EntityManager, now = new Date()): Promise<void> {
  await seedDemoInventory(em);
  await seedDemoLoadSeries(em);
  // Assesses the inventory (so a start finds it current) and settles approvals that fail a blocking gate.
  await seedDemoDecisions(em);
  await seedDemoPermissions(em, now);
  await seedDemoMission(em, now);
}
