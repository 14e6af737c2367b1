import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { MikroORM } from '@mikro-orm/sqlite';
import { initORM } from '../../server/db.ts';

let orm: MikroORM;
beforeAll(async () => {
  orm = await initORM(':memory:');
});
afterAll(() => orm.close());

describe('migrations', () => {
  it('when every committed migration has run, then the database matches the entity schemas exactly', async () => {
    const diff = await orm.schema.getUpdateSchemaSQL({ wrap: false });
    expect(diff.trim()).toBe('');
  });
});
