import fs from 'node:fs';
import path from 'node:path';
import { MikroORM, type Options } from '@mikro-orm/sqlite';
import { MikroORM as PostgresORM, type Options as PostgresOptions } from '@mikro-orm/postgresql';
import { BoundPostgreSqlDriver } from './sql/postgres-driver.ts';
import { isPostgres } from './sql/dialect.ts';
import { Migrator } from '@mikro-orm/migrations';
import { entities } from './entities.ts';
import { migrationsList } from './migrations/index.ts';
import { BoundSqliteDriver } from './sql/sqlite-driver.ts';
import { sql } from './sql/query.ts';
import { postgresMigrationsList } from './migrations/postgres/index.ts';
import { ensurePostgis, POSTGIS_TABLES } from './sql/postgis.ts';

/** A `postgres://` or `postgresql://` address (DATABASE_URL) rather than an SQLite file path. */
export const isPostgresUrl = (target: string) => /^postgres(ql)?:\/\//i.test(target);

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

/** Pool size per process on PostgreSQL (DATABASE_POOL_MAX; 10): several processes share the server's connections. */
const POSTGRES_POOL_MAX = Number(process.env.DATABASE_POOL_MAX ?? 10);

export function postgresOrmOptions(url: string): PostgresOptions {
  return {
    clientUrl: url,
    // Every value reaches PostgreSQL as a bound parameter ($1, $2 …), never written into the SQL text.
    driver: BoundPostgreSqlDriver,
    entities,
    extensions: [Migrator],
    allowGlobalContext: false,
    debug: false,
    // Timestamps are `timestamptz` and always read and written in UTC, whatever the server's time zone.
    forceUtcTimezone: true,
    pool: { min: 0, max: POSTGRES_POOL_MAX },
    // PostGIS's own table (spatial reference systems) is not the app's: the schema generator leaves it alone.
    schemaGenerator: { skipTables: POSTGIS_TABLES },
    migrations: { migrationsList: postgresMigrationsList, snapshot: false, silent: true, transactional: true, allOrNothing: true, tableName: 'mikro_orm_migrations' },
  };
}

/**
 * Opens the database and applies every pending migration: an SQLite file (or ':memory:'), or PostgreSQL when
 * `target` is a postgres:// address. The app is written against one ORM type; both drivers are MikroORM's SQL
 * drivers over knex with the same EntityManager API, and SQL that differs between them goes through server/sql.
 */
export async function initORM(target: string): Promise<MikroORM> {
  if (isPostgresUrl(target)) {
    const orm = await PostgresORM.init(postgresOrmOptions(target));
    // Two processes starting at once must not both apply a migration: one waits for the other's lock.
    const knex = orm.em.getKnex();
    await knex.transaction(async (trx) => {
      await trx.raw('select pg_advisory_xact_lock(?)', [MIGRATION_LOCK]);
      await orm.getMigrator().up();
      // PostGIS installed after a start with POSTGIS=off: its columns are added now.
      await ensurePostgis(orm.em as never);
    });
    return orm as unknown as MikroORM;
  }
  if (target !== ':memory:') fs.mkdirSync(path.dirname(target), { recursive: true });
  const orm = await MikroORM.init(ormOptions(target));
  await orm.getMigrator().up();
  return orm;
}

/** Runs `fn` while holding the start-up lock on PostgreSQL (so two processes never seed at once); as is on SQLite. */
export async function whileHoldingStartLock<T>(orm: MikroORM, fn: () => Promise<T>): Promise<T> {
  if (!isPostgres(orm.em)) return fn();
  return orm.em.getKnex().transaction(async (trx) => {
    await trx.raw('select pg_advisory_xact_lock(?)', [MIGRATION_LOCK]);
    return fn();
  });
}

/** Advisory lock id held while migrations run on PostgreSQL (any constant; "roostln" in ASCII). */
const MIGRATION_LOCK = 0x726f6f73746c6e;

/** `PRAGMA integrity_check`: "ok", or the problems SQLite found. */
export async function integrityCheck(orm: MikroORM): Promise<string> {
  const rows = await sql.all<{ integrity_check: string }>(orm.em.fork(), 'PRAGMA integrity_check');
  return rows.map((r) => r.integrity_check).join('\n');
}
