import type { MikroORM } from '@mikro-orm/sqlite';
import type { AppConfig } from './env.ts';
import type { AppLucia } from './modules/auth/lucia.ts';
import type { Lifecycle } from './lifecycle.ts';
import type { AppStorage } from './modules/photos/storage.ts';

/** What every feature router is built from: one per running app. */
export interface AppContext {
  orm: MikroORM;
  config: AppConfig;
  lucia: AppLucia;
  /** Background jobs and other long-lived services register their stop functions here. */
  onClose: (fn: () => Promise<void> | void) => void;
  /** Requests in flight and the draining flag of a shutdown. */
  lifecycle: Lifecycle;
  /** Where photo files and attached documents live: UPLOADS_DIR, or the bucket STORAGE_URL names. */
  storage: AppStorage;
}
