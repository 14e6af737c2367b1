// Bulk writes with bound parameters: multi-row INSERT statements sized under the database's bound-parameter limit,
// run inside one transaction per call. The SQL dialect details (parameter limit, upsert clause) live here alone,
// so another database can be added behind the same functions.
import type { EntityManager } from '@mikro-orm/core';

/** SQLite's default SQLITE_MAX_VARIABLE_NUMBER is 32 766 (since 3.32), PostgreSQL's limit 65 535; stay well under both. */
const MAX_PARAMS = 30_000;

type Knex = { raw: (sql: string, bindings: unknown[]) => Promise<unknown>; transaction: <T>(fn: (trx: Knex) => Promise<T>) => Promise<T> };

function knexOf(em: EntityManager): Knex {
  return (em as unknown as { getKnex(): Knex }).getKnex();
}

const quote = (name: string) => {
  if (!/^[a-z_][a-z0-9_]*$/.test(name)) throw new Error(`not a column name: ${name}`);
  return `"${name}"`;
};

export interface BulkOptions {
  /** Columns of a unique key: a row that collides replaces the other columns of the stored row. */
  upsertOn?: string[];
  /** Skip rows that collide with a stored one. */
  ignoreConflicts?: boolean;
}

function insertSql(table: string, columns: string[], rowCount: number, opts: BulkOptions) {
  const row = `(${columns.map(() => '?').join(',')})`;
  let sql = `insert into ${quote(table)} (${columns.map(quote).join(',')}) values ${Array.from({ length: rowCount }, () => row).join(',')}`;
  if (opts.upsertOn) {
    const rest = columns.filter((c) => !opts.upsertOn!.includes(c));
    sql += ` on conflict (${opts.upsertOn.map(quote).join(',')}) do update set ${rest.map((c) => `${quote(c)} = excluded.${quote(c)}`).join(',')}`;
  } else if (opts.ignoreConflicts) sql += ' on conflict do nothing';
  return sql;
}

/** Rows per statement for this many columns. */
export function rowsPerStatement(columnCount: number) {
  return Math.max(1, Math.floor(MAX_PARAMS / columnCount));
}

/** Runs writes in one transaction on the database's own connection (raw SQL, bound parameters only). */
export async function inTransaction<T>(em: EntityManager, work: (run: (sql: string, params: unknown[]) => Promise<unknown>) => Promise<T>): Promise<T> {
  return knexOf(em).transaction(async (trx) => work((sql, params) => trx.raw(sql, params)));
}

/**
 * Inserts rows (arrays of values in `columns` order) with multi-row prepared statements in one transaction.
 * `before` runs first in the same transaction (e.g. deleting the rows being replaced).
 */
export async function bulkInsert(
  em: EntityManager,
  table: string,
  columns: string[],
  rows: unknown[][],
  opts: BulkOptions & { before?: (run: (sql: string, params: unknown[]) => Promise<unknown>) => Promise<void> } = {},
): Promise<void> {
  if (rows.length === 0 && !opts.before) return;
  const per = rowsPerStatement(columns.length);
  await inTransaction(em, async (run) => {
    if (opts.before) await opts.before(run);
    let fullSql: string | null = null;
    for (let i = 0; i < rows.length; i += per) {
      const chunk = rows.slice(i, i + per);
      const sql = chunk.length === per ? (fullSql ??= insertSql(table, columns, per, opts)) : insertSql(table, columns, chunk.length, opts);
      const params: unknown[] = new Array(chunk.length * columns.length);
      let k = 0;
      for (const r of chunk) for (let c = 0; c < columns.length; c++) params[k++] = r[c] === undefined ? null : r[c];
      await run(sql, params);
    }
  });
}

export { marks } from './query.ts';
