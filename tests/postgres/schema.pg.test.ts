import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { MikroORM } from '@mikro-orm/sqlite';
import { initORM } from '../../server/db.ts';
import { migrationsList } from '../../server/migrations/index.ts';
import { postgresMigrationsList } from '../../server/migrations/postgres/index.ts';
import { freshPostgresDatabase } from './databases.ts';

let orm: MikroORM;
beforeAll(async () => {
  orm = await initORM((await freshPostgresDatabase())!);
});
afterAll(() => orm.close());

describe('PostgreSQL migrations', () => {
  it('when every committed PostgreSQL migration has run, then the database matches the entity schemas exactly', async () => {
    const diff = await orm.schema.getUpdateSchemaSQL({ wrap: false });
    expect(diff.trim()).toBe('');
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
