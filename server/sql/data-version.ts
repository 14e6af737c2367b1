// A cheap data version of the database, for caches that must never serve a figure older than the data (list
// totals, tiles). SQLite: total_changes() counts every row this connection inserted, updated or deleted (the server
// holds one connection), and PRAGMA data_version changes when another connection commits. Both are O(1).
// PostgreSQL: the write-ahead log position, which moves with every committed change (of any process); coarser than
// SQLite's counters (it also moves for other databases of the cluster and for maintenance), so a cache may be
// dropped needlessly, never kept too long.
import type { EntityManager } from '@mikro-orm/core';
import { sql } from './query.ts';
import { isPostgres } from './dialect.ts';

interface VersionState {
  /** Rows changed by writers that touch only stored assessments (the bulk rescorer): the inventory's version skips them. */
  assessmentOnly: number;
}

const states = new WeakMap<object, VersionState>();

function stateOf(em: EntityManager): VersionState {
  const key = em.getConnection();
  let s = states.get(key);
  if (!s) states.set(key, (s = { assessmentOnly: 0 }));
  return s;
}

export type VersionScope = 'all' | 'inventory';

/**
 * The current data version as a string. `all`: any change anywhere. `inventory`: any change except those of
 * assessment-only writers (so totals that do not depend on assessments stay cached during a full rescore).
 */
export async function dataVersion(em: EntityManager, scope: VersionScope = 'all'): Promise<string> {
  if (isPostgres(em)) {
    // The insert position, not the write position: with synchronous_commit off the written position lags commits,
    // which would leave a cache keyed on it serving pages from before the latest change.
    const pg = (await sql.get<{ v: string }>(em, 'select pg_current_wal_insert_lsn()::text as v'))!;
    return `pg:${pg.v}`;
  }
  const row = (await sql.get<{ c: number; d: number }>(em, 'select total_changes() as c, (select data_version from pragma_data_version) as d'))!;
  const changes = Number(row.c) - (scope === 'inventory' ? stateOf(em).assessmentOnly : 0);
  return `${row.d}:${changes}`;
}

/** The connection's change counter, read inside a transaction by a writer that counts its own changes. */
export async function changeCounter(run: (sql: string, params: unknown[]) => Promise<unknown>): Promise<number> {
  const rows = (await run('select total_changes() as c', [])) as { c: number }[];
  return Number(rows[0].c);
}

/** Records rows changed by an assessment-only writer (measured inside its own transaction). */
export function noteAssessmentOnlyChanges(em: EntityManager, rows: number) {
  stateOf(em).assessmentOnly += rows;
}
