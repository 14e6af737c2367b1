// The order and value conversions `npm run db:copy` uses, on this version's real table list.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from './helpers.ts';
import { convert, dependencyOrder } from '../../server/copy/db-copy.ts';

let t: TestApp;
let tables: Map<string, { name: string; type: string }[]>;
beforeAll(async () => {
  t = await makeTestApp({ databaseUrl: null });
  tables = new Map();
  for (const meta of Object.values(t.orm.getMetadata().getAll())) {
    if (!meta.tableName || meta.embeddable) continue;
    tables.set(meta.tableName, Object.values(meta.properties).flatMap((p) => (p.fieldNames ?? []).map((name) => ({ name, type: 'text' }))));
  }
});
afterAll(() => t?.close());

describe('db:copy order', () => {
  it('when the tables are ordered, then each comes after the tables its *_id columns name', () => {
    const order = dependencyOrder(tables);
    expect(new Set(order)).toEqual(new Set(tables.keys()));
    const at = (n: string) => order.indexOf(n);
    expect(at('structures')).toBeGreaterThan(at('lines'));
    expect(at('spans')).toBeGreaterThan(at('structures'));
    expect(at('spans')).toBeGreaterThan(at('lines'));
    expect(at('hazards')).toBeGreaterThan(at('spans'));
    expect(at('photos')).toBeGreaterThan(at('spans'));
    expect(at('photos')).toBeGreaterThan(at('hazards'));
    expect(at('sessions')).toBeGreaterThan(at('users'));
    expect(at('line_permissions')).toBeGreaterThan(at('lines'));
  });

  it('when a declared foreign key names another table, then that table comes first, and a cycle does not hang', () => {
    const cols = new Map([
      ['a', [{ name: 'id', type: 'text' }]],
      ['b', [{ name: 'id', type: 'text' }]],
    ]);
    expect(dependencyOrder(cols, [{ from: 'a', to: 'b' }])).toEqual(['b', 'a']);
    expect(dependencyOrder(cols, [{ from: 'a', to: 'b' }, { from: 'b', to: 'a' }]).sort()).toEqual(['a', 'b']);
  });
});

describe('db:copy values', () => {
  it('when SQLite values meet PostgreSQL column types, then booleans, times, JSON and text come out as the type wants', () => {
    expect(convert(1, 'boolean')).toBe(true);
    expect(convert(0, 'boolean')).toBe(false);
    expect(convert(null, 'boolean')).toBeNull();
    // The app's SQLite driver keeps Date values as milliseconds since 1970 (UTC).
    expect((convert(Date.UTC(2026, 11, 3, 17, 7, 51, 946), 'timestamp with time zone') as Date).toISOString()).toBe('2026-12-03T17:07:51.946Z');
    // SQLite's own datetime() text has no zone and is UTC.
    expect((convert('2026-12-03 17:07:51', 'timestamp with time zone') as Date).toISOString()).toBe('2026-12-03T17:07:51.000Z');
    expect(convert('{"a":[1,2]}', 'jsonb')).toBe('{"a":[1,2]}');
    expect(convert(42, 'character varying')).toBe('42');
    expect(convert(2.5, 'double precision')).toBe(2.5);
  });
});
