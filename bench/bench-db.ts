import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { MikroORM } from '@mikro-orm/sqlite';
import { initORM } from '../server/db.ts';
import { seedScaleAccounts } from '../server/seeders/index.ts';

export interface BenchDatabase {
  orm: MikroORM;
  /** The SQLite file, in a temp folder of its own. */
  file: string;
  /** The demo surveyor, who records the seeded inventory. */
  surveyorId: string;
  /** Closes the database and removes its folder. */
  close: () => Promise<void>;
}

/** A fresh database for a bench: migrated, with the demo accounts and the default profiles and settings. */
export async function openBenchDatabase(name: string): Promise<BenchDatabase> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), `roostline-${name}-`));
  const file = path.join(dir, `${name}.sqlite`);
  const orm = await initORM(file);
  const close = async () => {
    await orm.close();
    fs.rmSync(dir, { recursive: true, force: true });
  };
  try {
    return { orm, file, surveyorId: await seedScaleAccounts(orm.em.fork()), close };
  } catch (err) {
    await close();
    throw err;
  }
}
