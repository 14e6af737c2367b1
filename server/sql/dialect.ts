// The few places where SQLite and PostgreSQL need different SQL, behind one function each, so feature modules keep
// one query for both. Everything else the app writes is SQL both accept: double-quoted identifiers, `?` bound
// parameters (knex numbers them $1, $2 … on PostgreSQL), `on conflict … do update`, `lower(x) like lower(?)` for
// case-insensitive search (SQLite's LIKE ignores ASCII case, PostgreSQL's does not), and counts read through
// Number() (PostgreSQL answers bigint counts as strings).
import type { EntityManager } from '@mikro-orm/core';
import { PostgreSqlPlatform } from '@mikro-orm/postgresql';

export type Dialect = 'sqlite' | 'postgresql';

export function dialectOf(em: Pick<EntityManager, 'getPlatform'>): Dialect {
  return em.getPlatform() instanceof PostgreSqlPlatform ? 'postgresql' : 'sqlite';
}

export const isPostgres = (em: Pick<EntityManager, 'getPlatform'>) => dialectOf(em) === 'postgresql';

/** SQL answering one row `{ name }` when a table of that name (bound parameter) exists. */
export function tableExistsSql(em: Pick<EntityManager, 'getPlatform'>): string {
  return isPostgres(em)
    ? 'select table_name as name from information_schema.tables where table_schema = current_schema() and table_name = ?'
    : "select name from sqlite_master where type = 'table' and name = ?";
}

/**
 * A JSON column's top-level text field as SQL (`key` must be a plain identifier; it is part of the SQL, never a
 * value from input). SQLite keeps JSON as text and reads it with json_extract; PostgreSQL keeps jsonb and reads ->>.
 */
export function jsonTextField(em: Pick<EntityManager, 'getPlatform'>, column: string, key: string): string {
  if (!/^[a-zA-Z_][a-zA-Z0-9_]*$/.test(key) || !/^[a-z_."]+$/.test(column)) throw new Error(`not a plain JSON path: ${column}.${key}`);
  return isPostgres(em) ? `(${column} ->> '${key}')` : `json_extract(${column}, '$.${key}')`;
}

/** A JSON column's value as the app stored it: SQLite answers the text, PostgreSQL the parsed value. */
export function readJson<T = unknown>(value: unknown): T {
  return (typeof value === 'string' ? JSON.parse(value) : value) as T;
}

/**
 * Inside a transaction: waits until no other transaction holding the same named lock is open, and holds it to
 * the end of this one (commit or rollback). On SQLite this costs nothing: the server has one connection, so its
 * transactions already run one at a time, and another process's write waits in the busy timeout. On PostgreSQL
 * (a pool of connections, maybe several processes) it is a transaction-scoped advisory lock, so a check-then-write
 * (the last admin, delete-then-insert of a span's assessments) cannot interleave with another one of its kind.
 */
export async function lockForTransaction(tx: Pick<EntityManager, 'getPlatform' | 'getConnection' | 'getTransactionContext'>, name: string): Promise<void> {
  if (!isPostgres(tx)) return;
  if (!tx.getTransactionContext()) throw new Error(`lockForTransaction(${name}) needs a transaction`);
  await tx.getConnection().execute('select pg_advisory_xact_lock(hashtext(?))', [name], 'all', tx.getTransactionContext());
}
