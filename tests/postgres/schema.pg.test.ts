import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { MikroORM } from '@mikro-orm/sqlite';
import { initORM } from '../../server/db.ts';
import { migrationsList } from '../../server/migrations/index.ts';
import { postgresMigrationsList } from '../../server/migrations/postgres/index.ts';
import { freshPostgresDatabase } from './databases.ts';
import { POSTGIS_COLUMNS, postgisStatement, usesPostgis } from '../../server/sql/postgis.ts';

let orm: MikroORM;
beforeAll(async () => {
  orm = await initORM((await freshPostgresDatabase())!);
});
afterAll(() => orm.close());

describe('PostgreSQL migrations', () => {
  it('when every committed PostgreSQL migration has run, then the database matches the entity schemas exactly, apart from the PostGIS columns', async () => {
    const statements = (await orm.schema.getUpdateSchemaSQL({ wrap: false }))
      .split(/;\s*\n/)
      .map((s) => s.trim())
      .filter(Boolean);
    // The only difference allowed: the generator would drop the PostGIS geometry columns and their indexes, which
    // the entities do not declare (server/sql/postgis.ts). Anything else is a migration out of step.
    expect(statements.filter((s) => !postgisStatement(s))).toEqual([]);
    const postgis = await usesPostgis(orm.em as never);
    const expected = postgis ? Object.entries(POSTGIS_COLUMNS).flatMap(([t, cols]) => cols.flatMap((c) => [`drop index "${t}_${c}_gist"`, `alter table "${t}" drop column "${c}"`])) : [];
    expect(statements.map((s) => s.replace(/;$/, '')).sort()).toEqual(expected.sort());
  });

  it('with PostGIS, each geometry column is a geometry in WGS 84 with its GiST index, and follows the columns it is made from', async (t) => {
    if (!(await usesPostgis(orm.em as never))) t.skip('PostGIS is not installed on this PostgreSQL (apt-get install postgresql-15-postgis-3): its columns are not checked');
    const conn = orm.em.fork().getConnection();
    const columns = await conn.execute<{ table_name: string; column_name: string; srid: number }[]>(
      "select f_table_name as table_name, f_geometry_column as column_name, srid from geometry_columns where f_table_schema = current_schema() order by 1, 2",
    );
    expect(columns.map((c) => [c.table_name, c.column_name, c.srid])).toEqual(Object.entries(POSTGIS_COLUMNS).sort().flatMap(([t, cols]) => cols.map((c) => [t, c, 4326])));
    const indexes = await conn.execute<{ indexname: string; indexdef: string }[]>("select indexname, indexdef from pg_indexes where schemaname = current_schema() and indexname like '%_geom_gist'");
    expect(indexes.map((i) => i.indexname).sort()).toEqual(Object.keys(POSTGIS_COLUMNS).map((t) => `${t}_geom_gist`).sort());
    for (const i of indexes) expect(i.indexdef).toMatch(/USING gist/);
    // A span written before its structures, then a structure moved: the span's line follows both.
    const now = new Date().toISOString();
    await conn.execute("insert into lines (id, name, owner, voltage_kv, frequency_hz, load_typical_a, load_min_a, load_peak_a, created_at, updated_at) values ('l1', 'Geometry line', 'Harrow Vale Power Cooperative', 69, 60, 300, 120, 520, ?, ?)", [now, now]);
    await conn.execute("insert into spans (id, line_id, from_structure_id, to_structure_id, length_m, created_at, updated_at) values ('sp1', 'l1', 'a1', 'b1', 100, ?, ?)", [now, now]);
    for (const [id, lon] of [['a1', 10], ['b1', 10.001]] as const) {
      await conn.execute("insert into structures (id, line_id, lat, lon, kind, label, attachment_height_m, created_at, updated_at) values (?, 'l1', 50, ?, 'pole', ?, 12, ?, ?)", [id, lon, id, now, now]);
    }
    const line = async () => (await conn.execute<{ g: string }[]>("select ST_AsText(geom) as g from spans where id = 'sp1'"))[0].g;
    expect(await line()).toBe('LINESTRING(10 50,10.001 50)');
    await conn.execute("update structures set lat = 50.002 where id = 'b1'");
    expect(await line()).toBe('LINESTRING(10 50,10.001 50.002)');
    await conn.execute("update spans set to_structure_id = 'a1', from_structure_id = 'b1' where id = 'sp1'");
    expect(await line()).toBe('LINESTRING(10.001 50.002,10 50)');
  });

  it('every SQLite migration after the PostgreSQL baseline has a PostgreSQL twin of the same name, and no twin lacks its SQLite one', () => {
    const [baseline, ...twins] = postgresMigrationsList.map((m) => m.name);
    const later = migrationsList.map((m) => m.name).filter((n) => n > baseline);
    expect(migrationsList.map((m) => m.name)).toContain(baseline);
    expect(twins).toEqual(later);
  });

  it('the catalogues the SQLite migrations fill are filled on PostgreSQL too', async () => {
    const conn = orm.em.fork().getConnection();
    const [{ n: conductors }] = await conn.execute<{ n: string }[]>('select count(*) as n from conductor_types');
    const [{ n: kinds }] = await conn.execute<{ n: string }[]>('select count(*) as n from hazard_kinds');
    expect(Number(conductors)).toBeGreaterThanOrEqual(6);
    expect(Number(kinds)).toBeGreaterThan(0);
  });
});
