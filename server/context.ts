import type { MikroORM } from '@mikro-orm/sqlite';
import type { AppConfig } from './env.ts';
import type { AppLucia } from './modules/auth/lucia.ts';
import type { Lifecycle } from './lifecycle.ts';

/** What every feature router is built from: one per running app. */
export interface AppContext {
  orm: MikroORM;
  config: AppConfig;
  lucia: AppLucia;
  /** Background jobs and other long-lived services register their stop functions here. */
  onClose: (fn: () => Promise<void> | void) => void;
  /** Requests in flight and the draining flag of a shutdown. */
  lifecycle: Lifecycle;
}
