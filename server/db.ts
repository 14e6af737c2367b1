import fs from 'node:fs';
import path from 'node:path';
import { MikroORM, type Options } from '@mikro-orm/sqlite';
import { Migrator } from '@mikro-orm/migrations';
import { entities } from './entities.ts';
import { migrationsList } from './migrations/index.ts';

export function ormOptions(databasePath: string): Options {
  return {
    dbName: databasePath,
    entities,
    extensions: [Migrator],
    allowGlobalContext: false,
    debug: false,
    migrations: { migrationsList, snapshot: false, silent: true, transactional: true, allOrNothing: true },
    // WAL lets readers go on while a writer commits; foreign keys on for every connection.
    pool: {
      afterCreate: (conn: any, done: (err: Error | null, conn: unknown) => void) => {
        conn.run('PRAGMA foreign_keys = ON', () => {
          if (databasePath === ':memory:') return done(null, conn);
          conn.run('PRAGMA journal_mode = WAL', () => conn.run('PRAGMA busy_timeout = 5000', (err: Error | null) => done(err, conn)));
        });
      },
    },
  };
}

/** Opens the database and applies every pending migration. */
export async function initORM(databasePath: string): Promise<MikroORM> {
  if (databasePath !== ':memory:') fs.mkdirSync(path.dirname(databasePath), { recursive: true });
  const orm = await MikroORM.init(ormOptions(databasePath));
  await orm.getMigrator().up();
  return orm;
}
