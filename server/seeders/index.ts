import type { MikroORM } from '@mikro-orm/sqlite';
import { User } from '../modules/auth/user.entity.ts';
import { seedDemoUsers } from './demo-users.ts';
import { seedDemoInventory } from './demo-inventory.ts';
import { seedDemoLoadSeries } from './demo-load-series.ts';

/** Seeds the demo scenario into an empty database (no users yet); returns whether it did. */
export async function seedDemoIfEmpty(orm: MikroORM): Promise<boolean> {
  const em = orm.em.fork();
  if ((await em.count(User, {})) > 0) return false;
  await seedDemoUsers(em);
  await seedDemoInventory(em);
  await seedDemoLoadSeries(em);
  return true;
}
