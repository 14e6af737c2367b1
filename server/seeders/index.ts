import type { EntityManager, MikroORM } from '@mikro-orm/sqlite';
import { User } from '../modules/auth/user.entity.ts';
import { seedDemoUsers } from './demo-users.ts';
import { seedDemoInventory } from './demo-inventory.ts';
import { seedDemoLoadSeries } from './demo-load-series.ts';
import { seedDemoMission, seedDemoPermissions } from './demo-missions.ts';
import { seedDemoDecisions } from './demo-decisions.ts';
import { seedScaleInventory, type ScaleSeedResult } from './scale-inventory.ts';
import { ensureAssessmentDefaults } from '../modules/assessment/profiles.service.ts';

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

/** The demo accounts with the default profiles and settings, and no inventory; returns the demo surveyor's id. */
export async function seedScaleAccounts(em: EntityManager): Promise<string> {
  await seedDemoUsers(em);
  await em.flush();
  await ensureAssessmentDefaults(em);
  return (await em.findOneOrFail(User, { email: 'surveyor@roostline.test' })).id;
}

/** An empty database gets the demo accounts and an invented inventory of `spans` spans, all recorded by the demo
 * surveyor (for trying the screens on a large inventory); null when the database already has users. */
export async function seedScaleIfEmpty(orm: MikroORM, spans: number): Promise<ScaleSeedResult | null> {
  const em = orm.em.fork();
  if ((await em.count(User, {})) > 0) return null;
  const surveyorId = await seedScaleAccounts(em);
  return seedScaleInventory(orm.em.fork(), { spans, surveyorIds: [surveyorId] });
}
