// Raw SQL with bound parameters, and the one path every statement takes to the driver.
//
// MikroORM's own `Connection.execute(sql, params)` formats the values into the SQL text (platform.formatQuery)
// and sends the result without parameters. `executeBound` instead hands the SQL with its `?` placeholders and the
// values to knex's `raw(sql, bindings)`, so the driver binds them (SQLite: sqlite3_bind_*; PostgreSQL: `$n`).
// The app's connection class overrides `execute` with it (server/sql/sqlite-driver.ts), so the ORM's own queries
// (finds, flushes) bind too, and the helpers below are what module code calls for hand-written SQL.
//
// SQL text is always a constant of the code; identifiers that vary (a table name) come from a fixed list in the
// code, never from input. Placeholders are `?` (knex turns them into the dialect's own form).
import type { EntityManager } from '@mikro-orm/core';
import { Utils } from '@mikro-orm/core';
import type { AbstractSqlConnection } from '@mikro-orm/knex';

export type SqlMethod = 'all' | 'get' | 'run';

export interface RunResult {
  affectedRows: number;
  insertId?: number | string;
}

/** The members of MikroORM's SQL connection the bound path needs (some are protected in its types). */
interface ConnectionInternals {
  ensureConnection(): Promise<void>;
  config: { get(key: 'onQuery'): (sql: string, params: readonly unknown[]) => string; getLogger(): { isEnabled(ns: string, ctx?: unknown): boolean } };
  platform: { formatQuery(sql: string, params: readonly unknown[]): string; processDateProperty(value: unknown): unknown };
  getSql(query: string, formatted: string, ctx?: unknown): string;
  executeQuery<T>(sql: string, cb: () => Promise<T>, ctx?: unknown): Promise<T>;
  transformRawResult<T>(res: unknown, method: SqlMethod): T;
  getKnex(): KnexLike;
}

interface KnexRaw {
  transacting(trx: unknown): KnexRaw;
  then: Promise<unknown>['then'];
}
interface KnexLike {
  raw(sql: string, bindings?: readonly unknown[]): KnexRaw;
}

/** A value as the driver takes it: the same conversions MikroORM's formatter applies, but as a binding. */
function toBinding(conn: ConnectionInternals, knex: KnexLike, value: unknown): unknown {
  if (value === undefined) return null;
  if (value instanceof Date) return conn.platform.processDateProperty(value);
  if (Utils.isRawSql(value)) return knex.raw(value.sql, (value.params ?? []).map((v) => toBinding(conn, knex, v)));
  // A list stands for `?, ?, …` (as the formatter expands it), each item bound on its own.
  if (Array.isArray(value)) return knex.raw(value.map(() => '?').join(', '), value.map((v) => toBinding(conn, knex, v)));
  if (Utils.isPlainObject(value)) return JSON.stringify(value);
  return value;
}

/**
 * Runs one statement on a MikroORM SQL connection with its values bound as parameters. Same signature and
 * results as `AbstractSqlConnection.execute` (logging, error conversion and result shapes stay MikroORM's).
 */
export async function executeBound<T>(
  connection: AbstractSqlConnection,
  queryOrKnex: string | { toSQL(): { sql: string; bindings?: readonly unknown[] }; client?: { transacting?: unknown } },
  params: readonly unknown[] = [],
  method: SqlMethod = 'all',
  ctx?: unknown,
  loggerContext?: object,
): Promise<T> {
  const conn = connection as unknown as ConnectionInternals;
  await conn.ensureConnection();
  let sql: string;
  if (typeof queryOrKnex === 'string') sql = queryOrKnex;
  else {
    ctx ??= queryOrKnex.client?.transacting ? queryOrKnex : null;
    const q = queryOrKnex.toSQL();
    sql = q.sql;
    params = q.bindings ?? [];
  }
  sql = conn.config.get('onQuery')(sql, params);
  // Only a log that asks for values sees them written into the text.
  const logged = conn.getSql(sql, conn.config.getLogger().isEnabled('query-params', loggerContext) ? conn.platform.formatQuery(sql, params) : sql, loggerContext);
  return conn.executeQuery(
    logged,
    async () => {
      const knex = conn.getKnex();
      const query = params.length ? knex.raw(sql, params.map((v) => toBinding(conn, knex, v))) : knex.raw(sql);
      if (ctx) query.transacting(ctx);
      return conn.transformRawResult<T>(await query, method);
    },
    { query: sql, params, ...loggerContext },
  );
}

function run<T>(em: EntityManager, text: string, params: readonly unknown[], method: SqlMethod): Promise<T> {
  return executeBound<T>(em.getConnection() as unknown as AbstractSqlConnection, text, params, method, em.getTransactionContext());
}

/**
 * Hand-written SQL for module code, inside the entity manager's transaction when it has one. Values go only
 * through `params` (one per `?`); the text never carries input.
 */
export const sql = {
  /** Every row. */
  all<T = Record<string, unknown>>(em: EntityManager, text: string, params: readonly unknown[] = []): Promise<T[]> {
    return run<T[]>(em, text, params, 'all');
  },
  /** The first row, or undefined. */
  async get<T = Record<string, unknown>>(em: EntityManager, text: string, params: readonly unknown[] = []): Promise<T | undefined> {
    return (await run<T[]>(em, text, params, 'all'))[0];
  },
  /** A statement that changes rows: how many it changed. */
  async run(em: EntityManager, text: string, params: readonly unknown[] = []): Promise<RunResult> {
    const res = await run<RunResult>(em, text, params, 'run');
    return { affectedRows: Number(res.affectedRows ?? 0), insertId: res.insertId };
  },
};

/** `?,?,…` for an IN list of n bound values. */
export const marks = (n: number) => Array.from({ length: n }, () => '?').join(',');
