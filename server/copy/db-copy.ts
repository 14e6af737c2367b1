// Moving an inventory from its SQLite file to PostgreSQL (`npm run db:copy`): every table, in dependency order,
// in batches of multi-row inserts with bound parameters, inside one transaction on the target; the photo and
// document files too when a new store is named; then a count check per table (and per file) against the source.
import fs from 'node:fs';
import pg from 'pg';
import sqlite3 from 'sqlite3';
import { initORM } from '../db.ts';
import { runningServer } from '../server-lock.ts';
import { POSTGIS_COLUMNS, POSTGIS_TABLES } from '../sql/postgis.ts';
import type { PhotoStorage } from '../modules/photos/photo.storage.ts';

/** Kept by each database for itself: never copied. */
// PostGIS's own table and its geometry columns (kept by the database from lon/lat and GeoJSON) are not copied.
const OWN_TABLES = new Set(['mikro_orm_migrations', ...POSTGIS_TABLES]);
/**
 * Filled by the PostgreSQL migrations themselves (the conductor and hazard-kind catalogues): rows there do not make
 * a target "in use". They are replaced by the source's rows, which an admin may have edited.
 */
export const MIGRATION_CATALOGUES = new Set(['conductor_types', 'hazard_kinds']);
/** PostgreSQL takes at most 65 535 bound parameters per statement; batches stay well below. */
const MAX_PARAMS = 30_000;
const MAX_BATCH_ROWS = 1_000;
const VARIANTS = ['.original', '.display.jpg', '.thumb.jpg'];

export interface CopyProgress {
  /** A phase starts: "files" or a table name, with how many items it has. */
  start(phase: string, total: number): void;
  advance(done: number): void;
  finish(phase: string): void;
}

export interface TableCheck {
  table: string;
  source: number;
  target: number;
}

export interface CopyResult {
  tables: TableCheck[];
  files: { expected: number; found: number; missingAtSource: string[]; missingAtTarget: string[] } | null;
  ok: boolean;
}

export class CopyRefused extends Error {}

/** Identifiers come from the databases' own catalogues; quoted all the same. */
const ident = (name: string) => `"${name.replace(/"/g, '""')}"`;

class Source {
  private constructor(private db: sqlite3.Database) {}
  static open(file: string): Promise<Source> {
    return new Promise((resolve, reject) => {
      const db = new sqlite3.Database(file, sqlite3.OPEN_READONLY, (err) => (err ? reject(err) : resolve(new Source(db))));
    });
  }
  all<T>(text: string, params: unknown[] = []): Promise<T[]> {
    return new Promise((resolve, reject) => this.db.all(text, params, (err, rows) => (err ? reject(err) : resolve(rows as T[]))));
  }
  close(): Promise<void> {
    return new Promise((resolve) => this.db.close(() => resolve()));
  }
}

interface Column {
  name: string;
  /** information_schema data_type on the target. */
  type: string;
  /**
   * Kept by the database itself, never written: a generated column, or a PostGIS geometry (generated from lon/lat
   * or kept by a trigger from the span's structures). The copy leaves it out; PostgreSQL fills it in.
   */
  derived?: boolean;
}

/** SQLite's value as the target column's type wants it (the app's SQLite driver keeps booleans as 0/1, times as ms). */
export function convert(value: unknown, type: string): unknown {
  if (value === null || value === undefined) return null;
  switch (type) {
    case 'boolean':
      return value === true || value === 1 || value === '1' || value === 'true';
    case 'timestamp with time zone':
    case 'timestamp without time zone':
      if (typeof value === 'number') return new Date(value);
      if (typeof value === 'string' && /^\d+$/.test(value)) return new Date(Number(value));
      // A zone-less text time is UTC, as SQLite's own datetime() writes it.
      if (typeof value === 'string' && /^\d{4}-\d\d-\d\d[ T]\d\d:\d\d(:\d\d(\.\d+)?)?$/.test(value)) return new Date(`${value.replace(' ', 'T')}Z`);
      return new Date(String(value));
    case 'date':
      return typeof value === 'number' ? new Date(value).toISOString().slice(0, 10) : value;
    case 'json':
    case 'jsonb':
      return typeof value === 'string' ? value : JSON.stringify(value);
    case 'text':
    case 'character varying':
      return typeof value === 'string' || Buffer.isBuffer(value) ? value : String(value);
    default:
      return value;
  }
}

/**
 * Tables ordered so that a table comes after the ones it names: by declared foreign keys, and by the app's naming
 * (a `span_id` column names `spans`, `line_id` names `lines`, …) since the schema declares none. Ties by name.
 */
export function dependencyOrder(tables: Map<string, Column[]>, foreignKeys: { from: string; to: string }[] = []): string[] {
  const names = [...tables.keys()].sort();
  const deps = new Map(names.map((n) => [n, new Set<string>()]));
  const byStem = new Map<string, string>();
  for (const n of names) {
    byStem.set(n, n);
    if (n.endsWith('ies')) byStem.set(`${n.slice(0, -3)}y`, n);
    else if (n.endsWith('s')) byStem.set(n.slice(0, -1), n);
  }
  for (const [table, cols] of tables) {
    for (const c of cols) {
      const m = /^(?:.*_)?([a-z]+)_id$/.exec(c.name);
      const stems = m ? [c.name.slice(0, -3), m[1]] : [];
      const to = stems.map((s) => byStem.get(s)).find((x) => x && x !== table);
      if (to) deps.get(table)!.add(to);
    }
  }
  for (const fk of foreignKeys) if (fk.from !== fk.to && deps.has(fk.from) && deps.has(fk.to)) deps.get(fk.from)!.add(fk.to);
  const out: string[] = [];
  const state = new Map<string, 'visiting' | 'done'>();
  const visit = (n: string) => {
    if (state.get(n) === 'done' || state.get(n) === 'visiting') return; // a cycle is broken where it is met
    state.set(n, 'visiting');
    for (const d of [...deps.get(n)!].sort()) visit(d);
    state.set(n, 'done');
    out.push(n);
  };
  for (const n of names) visit(n);
  return out;
}

async function targetTables(client: pg.Client): Promise<Map<string, Column[]>> {
  const rows = (
    await client.query<{ table_name: string; column_name: string; data_type: string; derived: boolean }>(
      // Tables an extension owns (PostGIS's spatial_ref_sys) belong to the extension, not to the inventory.
      `select c.table_name, c.column_name, c.data_type, (c.is_generated = 'ALWAYS' or c.udt_name in ('geometry', 'geography')) as derived
         from information_schema.columns c
         join information_schema.tables t on t.table_schema = c.table_schema and t.table_name = c.table_name
        where c.table_schema = current_schema() and t.table_type = 'BASE TABLE'
          and not exists (select 1 from pg_depend d join pg_class k on k.oid = d.objid
                           where d.deptype = 'e' and k.relname = c.table_name and k.relnamespace = to_regnamespace(current_schema()))
        order by c.table_name, c.ordinal_position`,
    )
  ).rows;
  const out = new Map<string, Column[]>();
  for (const r of rows) {
    if (OWN_TABLES.has(r.table_name) || POSTGIS_COLUMNS[r.table_name]?.includes(r.column_name)) continue;
    if (!out.has(r.table_name)) out.set(r.table_name, []);
    out.get(r.table_name)!.push({ name: r.column_name, type: r.data_type, derived: r.derived });
  }
  return out;
}

/** Every stored file the source's rows name: three per photo, one per attached permission document. */
async function fileKeys(source: Source): Promise<string[]> {
  const photos = await source.all<{ storage_key: string }>('select storage_key from photos order by id');
  const docs = await source.all<{ document_key: string }>('select document_key from line_permissions where document_key is not null order by id');
  return [...photos.flatMap((p) => VARIANTS.map((v) => p.storage_key + v)), ...docs.map((d) => d.document_key)];
}

const count = async (client: pg.Client, table: string) => Number((await client.query<{ n: string }>(`select count(*) as n from ${ident(table)}`)).rows[0].n);

export interface CopyOptions {
  from: string;
  to: string;
  /** Replace whatever the target holds (in the same transaction as the copy). */
  force?: boolean;
  /** Source and target stores for the files; both null = the files stay where they are (e.g. UPLOADS_DIR). */
  files?: { from: PhotoStorage; to: PhotoStorage } | null;
  progress?: CopyProgress;
}

export async function copyDatabase(opts: CopyOptions): Promise<CopyResult> {
  if (!fs.existsSync(opts.from)) throw new CopyRefused(`${opts.from} does not exist`);
  const pid = runningServer(opts.from);
  if (pid) throw new CopyRefused(`A Roostline server (pid ${pid}) is running on ${opts.from}; stop it first, so that nothing is written after the copy starts`);
  const progress = opts.progress ?? { start() {}, advance() {}, finish() {} };

  // The target gets this version's schema (the migrations run as at a server's start), then is checked for data.
  const orm = await initORM(opts.to);
  await orm.close();
  const source = await Source.open(opts.from);
  const client = new pg.Client({ connectionString: opts.to });
  await client.connect();
  try {
    const tables = await targetTables(client);
    const sourceColumns = new Map<string, Set<string>>();
    for (const { name } of await source.all<{ name: string }>("select name from sqlite_master where type = 'table' and name not like 'sqlite_%'")) {
      if (OWN_TABLES.has(name)) continue;
      sourceColumns.set(name, new Set((await source.all<{ name: string }>('select name from pragma_table_info(?)', [name])).map((c) => c.name)));
    }
    const differ: string[] = [];
    for (const [t, cols] of tables) {
      const have = sourceColumns.get(t);
      if (!have) differ.push(`table ${t} is missing`);
      else for (const c of cols) if (!have.has(c.name) && !c.derived) differ.push(`${t}.${c.name} is missing`);
    }
    for (const [t, have] of sourceColumns) {
      if (!tables.has(t)) differ.push(`table ${t} is unknown to this version`);
      else for (const c of have) if (!tables.get(t)!.some((x) => x.name === c)) differ.push(`${t}.${c} is unknown to this version`);
    }
    if (differ.length)
      throw new CopyRefused(
        `The SQLite file's tables are not this version's (${differ.slice(0, 5).join('; ')}${differ.length > 5 ? '; …' : ''}). ` +
          'Start this version of the server on it once (it applies its migrations), stop it, then copy again.',
      );

    const inUse: string[] = [];
    for (const t of tables.keys()) if (!MIGRATION_CATALOGUES.has(t) && (await count(client, t)) > 0) inUse.push(t);
    if (inUse.length && !opts.force)
      throw new CopyRefused(
        `The target already holds data (${inUse.slice(0, 6).join(', ')}${inUse.length > 6 ? ', …' : ''}). Copy into an empty database, ` +
          'or add --force to replace everything in it with the SQLite file\'s inventory.',
      );

    // Files first: a row is only ever committed after the files it names are stored (as the server does). Files
    // that reach the store before a failed copy are orphans the server's sweep removes.
    let files: CopyResult['files'] = null;
    if (opts.files) {
      const keys = await fileKeys(source);
      const missingAtSource: string[] = [];
      progress.start('files', keys.length);
      let done = 0;
      for (const key of keys) {
        const obj = await opts.files.from.get(key);
        if (!obj) missingAtSource.push(key);
        else await opts.files.to.put(key, obj.body, key.endsWith('.jpg') ? 'image/jpeg' : 'application/octet-stream');
        progress.advance(++done);
      }
      progress.finish('files');
      files = { expected: keys.length, found: 0, missingAtSource, missingAtTarget: [] };
    }

    const order = dependencyOrder(tables);
    await client.query('begin');
    try {
      // Empties the catalogues the migrations filled (and, with --force, everything else) in the copy's transaction.
      await client.query(`truncate ${order.map(ident).join(', ')}`);
      for (const table of order) {
        const cols = tables.get(table)!.filter((c) => !c.derived);
        const [{ n }] = await source.all<{ n: number }>(`select count(*) as n from ${ident(table)}`);
        progress.start(table, n);
        const batch = Math.max(1, Math.min(MAX_BATCH_ROWS, Math.floor(MAX_PARAMS / cols.length)));
        const names = cols.map((c) => ident(c.name)).join(', ');
        let last = Number.MIN_SAFE_INTEGER;
        let done = 0;
        for (;;) {
          // Keyset paging on SQLite's rowid: each batch is one indexed range read, whatever the table's size.
          const rows = await source.all<Record<string, unknown>>(`select rowid as "__rowid", ${names} from ${ident(table)} where rowid > ? order by rowid limit ?`, [last, batch]);
          if (!rows.length) break;
          const values: unknown[] = [];
          const tuples = rows.map((row) => `(${cols.map((c) => `$${values.push(convert(row[c.name], c.type))}`).join(', ')})`);
          await client.query(`insert into ${ident(table)} (${names}) values ${tuples.join(', ')}`, values);
          last = Number(rows[rows.length - 1].__rowid);
          done += rows.length;
          progress.advance(done);
        }
        progress.finish(table);
      }
      // Identity columns continue after the copied ids.
      const seqs = await client.query<{ table_name: string; column_name: string; seq: string }>(
        `select table_name, column_name, pg_get_serial_sequence(quote_ident(table_name), column_name) as seq from information_schema.columns
          where table_schema = current_schema() and pg_get_serial_sequence(quote_ident(table_name), column_name) is not null`,
      );
      for (const s of seqs.rows)
        if (tables.has(s.table_name))
          await client.query(`select setval($1, coalesce((select max(${ident(s.column_name)}) from ${ident(s.table_name)}), 0) + 1, false)`, [s.seq]);
      await client.query('commit');
    } catch (err) {
      await client.query('rollback').catch(() => undefined);
      throw err;
    }
    return await checkCopy(source, client, order, opts.files?.to ?? null, files);
  } finally {
    await client.end();
    await source.close();
  }
}

/** Rows per table on both sides, and every file the rows name in the target store. */
async function checkCopy(source: Source, client: pg.Client, order: string[], to: PhotoStorage | null, files: CopyResult['files']): Promise<CopyResult> {
  const tables: TableCheck[] = [];
  for (const table of order) {
    const [{ n }] = await source.all<{ n: number }>(`select count(*) as n from ${ident(table)}`);
    tables.push({ table, source: Number(n), target: await count(client, table) });
  }
  if (files && to) {
    const keys = await fileKeys(source);
    const stored = new Set<string>();
    for (const prefix of new Set(keys.map((k) => k.slice(0, k.lastIndexOf('/') + 1))))
      for (const k of (await to.list?.(prefix)) ?? []) stored.add(k.key);
    files.missingAtTarget = keys.filter((k) => !stored.has(k) && !files.missingAtSource.includes(k));
    files.found = keys.filter((k) => stored.has(k)).length;
  }
  const ok = tables.every((t) => t.source === t.target) && (!files || (files.missingAtSource.length === 0 && files.missingAtTarget.length === 0));
  return { tables, files, ok };
}

/** The count check for a copy made earlier (`--check`): the same comparison without copying anything. */
export async function checkExistingCopy(opts: { from: string; to: string; files?: PhotoStorage | null }): Promise<CopyResult> {
  const source = await Source.open(opts.from);
  const client = new pg.Client({ connectionString: opts.to });
  await client.connect();
  try {
    const order = dependencyOrder(await targetTables(client));
    const files = opts.files ? { expected: (await fileKeys(source)).length, found: 0, missingAtSource: [], missingAtTarget: [] } : null;
    return await checkCopy(source, client, order, opts.files ?? null, files);
  } finally {
    await client.end();
    await source.close();
  }
}
