// PostGIS on PostgreSQL: geometry columns kept in step with the lon/lat and GeoJSON columns the entities use, with
// GiST indexes, for the spatial queries PostGIS answers better than JavaScript (spans touching a zone, spans near a
// photo, span tiles as MVT). The columns exist only in the PostgreSQL database: the entities do not have them, so
// the schema generator's wish to drop them is set aside by name (postgisStatement: make-migration, the schema
// test), and SQLite keeps the JavaScript path.
//
// POSTGIS=off runs a PostgreSQL database without PostGIS (the JavaScript path); without that setting a server
// lacking the extension stops at the migration with a message saying what to install.
import type { EntityManager } from '@mikro-orm/core';
import { isPostgres } from './dialect.ts';
import { sql } from './query.ts';

/** The PostgreSQL-only columns, per table (each with its GiST index `<table>_geom_gist`). */
export const POSTGIS_COLUMNS: Record<string, string[]> = {
  structures: ['geom'],
  spans: ['geom'],
  zones: ['geom'],
};
/** The extension's own table in the app's schema (the spatial reference systems). */
export const POSTGIS_TABLES = ['spatial_ref_sys'];

/**
 * Whether a statement of the schema generator's diff only drops a PostGIS column or its index (the entities do not
 * know them): make-migration leaves such statements out, and the schema test allows exactly these.
 */
export function postgisStatement(statement: string): boolean {
  const s = statement.trim().replace(/;$/, '');
  return Object.entries(POSTGIS_COLUMNS).some(([table, columns]) =>
    columns.some((c) => s === `alter table "${table}" drop column "${c}"` || s === `drop index "${table}_${c}_gist"`),
  );
}

/** Whether the operator chose to run without PostGIS (POSTGIS=off). */
export const postgisDisabled = () => /^(off|false|0|no)$/i.test(process.env.POSTGIS ?? '');

export const POSTGIS_MISSING =
  'PostGIS is not installed on this PostgreSQL server (no "postgis" extension is available). Install it ' +
  '(Debian: apt-get install postgresql-15-postgis-3; a managed PostgreSQL: enable its PostGIS extension), ' +
  'or start Roostline with POSTGIS=off to run the spatial queries in JavaScript instead.';

/**
 * Every statement is idempotent, so the same list runs from the migration and again at start-up when PostGIS was
 * installed after a start with POSTGIS=off. Structures and zones: generated columns (PostgreSQL computes them on
 * every write). Spans: a line between its two structures, set by a trigger on the span (when its structures
 * change) and on the structure (when it is added or moves), whichever row is written first.
 */
export const POSTGIS_SETUP: string[] = [
  'create extension if not exists postgis',
  'alter table "structures" add column if not exists "geom" geometry(Point, 4326) generated always as (ST_SetSRID(ST_MakePoint("lon", "lat"), 4326)) stored',
  'create index if not exists "structures_geom_gist" on "structures" using gist ("geom")',
  'alter table "zones" add column if not exists "geom" geometry(Geometry, 4326) generated always as (ST_SetSRID(ST_GeomFromGeoJSON("geometry"), 4326)) stored',
  'create index if not exists "zones_geom_gist" on "zones" using gist ("geom")',
  'alter table "spans" add column if not exists "geom" geometry(LineString, 4326)',
  'create index if not exists "spans_geom_gist" on "spans" using gist ("geom")',
  `create or replace function roostline_span_geom() returns trigger language plpgsql as $$
begin
  new.geom := (select ST_MakeLine(a.geom, b.geom) from structures a, structures b where a.id = new.from_structure_id and b.id = new.to_structure_id);
  return new;
end $$`,
  'drop trigger if exists "spans_geom" on "spans"',
  'create trigger "spans_geom" before insert or update of "from_structure_id", "to_structure_id" on "spans" for each row execute function roostline_span_geom()',
  `create or replace function roostline_structure_moved() returns trigger language plpgsql as $$
begin
  update spans s set geom = (select ST_MakeLine(a.geom, b.geom) from structures a, structures b where a.id = s.from_structure_id and b.id = s.to_structure_id)
    where s.from_structure_id = new.id or s.to_structure_id = new.id;
  return null;
end $$`,
  'drop trigger if exists "structures_geom" on "structures"',
  'create trigger "structures_geom" after insert or update of "lon", "lat" on "structures" for each row execute function roostline_structure_moved()',
  // Spans written before this ran (an existing database taking PostGIS on).
  'update "spans" s set "geom" = (select ST_MakeLine(a."geom", b."geom") from "structures" a, "structures" b where a."id" = s."from_structure_id" and b."id" = s."to_structure_id") where s."geom" is null',
];

type Exec = (text: string) => Promise<unknown[]>;

/**
 * Installs PostGIS and its columns: true when done, false when it is absent and POSTGIS=off; throws POSTGIS_MISSING
 * when it is absent otherwise, and a message naming the fix when the database user may not create the extension.
 */
export async function installPostgis(exec: Exec): Promise<boolean> {
  if (postgisDisabled()) return false;
  const available = await exec("select 1 as ok from pg_available_extensions where name = 'postgis'");
  if (!available.length) throw new Error(POSTGIS_MISSING);
  try {
    await exec('create extension if not exists postgis');
  } catch (err) {
    throw new Error(
      `PostGIS is installed on the server but this database user may not create the extension (${(err as Error).message}). ` +
        'Ask the operator to run "CREATE EXTENSION postgis" in this database as its owner or a superuser, or start with POSTGIS=off.',
    );
  }
  for (const statement of POSTGIS_SETUP.slice(1)) await exec(statement);
  return true;
}

const inUse = new WeakMap<object, Promise<boolean>>();

/** Whether this database answers spatial queries with PostGIS (PostgreSQL with the geometry columns in place). */
export function usesPostgis(em: EntityManager): Promise<boolean> {
  if (!isPostgres(em) || postgisDisabled()) return Promise.resolve(false);
  const key = em.getDriver();
  let known = inUse.get(key);
  if (!known) {
    known = sql
      .get<{ n: number }>(
        em.fork(),
        "select count(*)::int as n from information_schema.columns where table_schema = current_schema() and table_name = 'spans' and column_name = 'geom'",
      )
      .then((r) => Number(r?.n ?? 0) > 0);
    inUse.set(key, known);
    known.catch(() => inUse.delete(key));
  }
  return known;
}

/**
 * At start-up on PostgreSQL: when the migration ran with POSTGIS=off but the extension is now available and the
 * setting is gone, the columns are added now (every statement is idempotent). Answers whether PostGIS is in use.
 */
export async function ensurePostgis(em: EntityManager): Promise<boolean> {
  if (!isPostgres(em) || postgisDisabled()) return false;
  if (await usesPostgis(em)) return true;
  const fork = em.fork();
  await installPostgis((text) => sql.all(fork, text));
  inUse.delete(em.getDriver());
  return usesPostgis(em);
}
