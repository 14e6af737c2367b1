import fs from 'node:fs';
import path from 'node:path';
import { MikroORM, type Options } from '@mikro-orm/sqlite';
import { Migrator } from '@mikro-orm/migrations';
import { entities } from './entities.ts';
import { migrationsList } from './migrations/index.ts';
import { BoundSqliteDriver } from './sql/sqlite-driver.ts';
import { sql } from './sql/query.ts';

/**
 * How long a connection waits for another process's lock before SQLite gives up (SQLite retries inside this
 * window itself). Inside the server there is one connection (knex's SQLite pool holds one), so the server's own
 * writes queue in order and never meet a lock; only another process (a backup, a restore check) can hold one.
 */
export const BUSY_TIMEOUT_MS = 15_000;

/**
 * Every connection's settings, in order. WAL lets readers (and an online backup) go on while a writer commits;
 * synchronous=FULL syncs the WAL at every commit, so a change answered with success survives a power cut as well
 * as a killed process (NORMAL would only survive the latter).
 */
export const CONNECTION_PRAGMAS = ['PRAGMA foreign_keys = ON', 'PRAGMA journal_mode = WAL', 'PRAGMA synchronous = FULL', `PRAGMA busy_timeout = ${BUSY_TIMEOUT_MS}`];

export function ormOptions(databasePath: string): Options {
  return {
    dbName: databasePath,
    // Every value reaches SQLite as a bound parameter, never written into the SQL text.
    driver: BoundSqliteDriver,
    entities,
    extensions: [Migrator],
    allowGlobalContext: false,
    debug: false,
    migrations: { migrationsList, snapshot: false, silent: true, transactional: true, allOrNothing: true },
    pool: {
      afterCreate: (conn: any, done: (err: Error | null, conn: unknown) => void) => {
        const pragmas = databasePath === ':memory:' ? CONNECTION_PRAGMAS.slice(0, 1) : CONNECTION_PRAGMAS;
        const next = (i: number) => {
          if (i === pragmas.length) return done(null, conn);
          conn.run(pragmas[i], (err: Error | null) => (err ? done(err, conn) : next(i + 1)));
        };
        next(0);
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

/** `PRAGMA integrity_check`: "ok", or the problems SQLite found. */
export async function integrityCheck(orm: MikroORM): Promise<string> {
  const rows = await sql.all<{ integrity_check: string }>(orm.em.fork(), 'PRAGMA integrity_check');
  return rows.map((r) => r.integrity_check).join('\n');
}
