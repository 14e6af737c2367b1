// Every SQL value reaches the driver as a bound parameter: the SQL text the sqlite3 driver receives carries `?`
// placeholders and never the value, for hand-written SQL (server/sql/query.ts) and for the ORM's own queries.
import sqlite3 from 'sqlite3';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { sql } from '../../server/sql/query.ts';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';

let t: TestApp;
let surveyor: Client;

beforeAll(async () => {
  t = await makeTestApp();
  surveyor = await t.as('surveyor');
});
afterAll(() => t.close());

/** Every statement the sqlite3 driver is handed while `work` runs, with the values it was given to bind. */
async function driverCalls<T>(work: () => Promise<T>): Promise<{ result: T; calls: { sql: string; params: unknown[] }[] }> {
  const calls: { sql: string; params: unknown[] }[] = [];
  for (const method of ['all', 'run', 'get', 'each', 'exec', 'prepare'] as const) {
    const original = sqlite3.Database.prototype[method] as (...a: unknown[]) => unknown;
    vi.spyOn(sqlite3.Database.prototype, method).mockImplementation(function (this: unknown, ...args: unknown[]) {
      calls.push({ sql: String(args[0]), params: Array.isArray(args[1]) ? args[1] : [] });
      return original.apply(this, args);
    } as never);
  }
  try {
    return { result: await work(), calls };
  } finally {
    vi.restoreAllMocks();
  }
}

// A quote, a `?`, a comment marker, a backslash, a NUL and another control character, and text outside ASCII:
// each one breaks, or changes the meaning of, SQL that has the value written into it.
const AWKWARD = "Vale's ? line; -- \\ \u0000 end\u0001 ±ç";

describe('hand-written SQL', () => {
  it('when a value holds a quote, a ? and control characters, then it round-trips byte for byte and the SQL text carries ? only', async () => {
    const em = t.orm.em.fork();
    const { calls } = await driverCalls(async () => {
      await sql.run(em, 'insert into pending_work (key, kind, payload, reason, requested_at) values (?, ?, ?, ?, ?)', ['k1', 'test', '{}', AWKWARD, 1]);
    });
    const insert = calls.find((c) => c.sql.startsWith('insert into pending_work'));
    expect(insert).toBeDefined();
    expect(insert!.sql).toBe('insert into pending_work (key, kind, payload, reason, requested_at) values (?, ?, ?, ?, ?)');
    expect(insert!.params).toEqual(['k1', 'test', '{}', AWKWARD, 1]);
    const row = await sql.get<{ reason: string }>(em, 'select reason from pending_work where key = ?', ['k1']);
    expect(row?.reason).toBe(AWKWARD);
    // The value finds its row when used as a condition, and a near miss does not.
    expect(await sql.all(em, 'select key from pending_work where reason = ?', [AWKWARD])).toEqual([{ key: 'k1' }]);
    expect(await sql.all(em, 'select key from pending_work where reason = ?', [AWKWARD.replace('\u0000', '')])).toEqual([]);
    expect((await sql.run(em, 'delete from pending_work where key = ?', ['k1'])).affectedRows).toBe(1);
  });

  it('when the entity manager is inside a transaction, then the statement is part of it (a rollback undoes it)', async () => {
    const em = t.orm.em.fork();
    await expect(
      em.transactional(async (tx) => {
        await sql.run(tx, 'insert into pending_work (key, kind, payload, reason, requested_at) values (?, ?, ?, ?, ?)', ['k2', 'test', '{}', 'inside', 2]);
        expect(await sql.get(tx, 'select key from pending_work where key = ?', ['k2'])).toEqual({ key: 'k2' });
        throw new Error('roll back');
      }),
    ).rejects.toThrow('roll back');
    expect(await sql.get(t.orm.em.fork(), 'select key from pending_work where key = ?', ['k2'])).toBeUndefined();
  });
});

describe("the ORM's own queries and the API", () => {
  it('when a line is created and found with an awkward name, then the insert and the search bind it and the name comes back unchanged', async () => {
    const name = "O'Hara ? Vale -- 33 kV \\ ±";
    const { result: created, calls: insertCalls } = await driverCalls(() =>
      surveyor.post('/api/lines', { name, owner: 'Harrow Vale Power Cooperative', voltageKv: 33, frequencyHz: 60, phases: 3, loadTypicalA: 200, loadMinA: 80, loadPeakA: 320 }),
    );
    expect(created.status).toBe(201);
    expect(created.body.name).toBe(name);
    const insert = insertCalls.find((c) => /^insert into [`"]?lines/.test(c.sql));
    expect(insert).toBeDefined();
    expect(insert!.sql).not.toContain("O'Hara");
    expect(insert!.sql).toContain('?');
    expect(insert!.params).toContain(name);
    for (const c of insertCalls) expect(c.sql).not.toContain('Hara');

    const { result: found, calls: listCalls } = await driverCalls(() => surveyor.get(`/api/lines/${created.body.id}`));
    expect(found.status).toBe(200);
    expect(found.body.name).toBe(name);
    for (const c of listCalls) expect(c.sql).not.toContain(created.body.id);
    expect(listCalls.some((c) => c.params.includes(created.body.id))).toBe(true);
  });

  it('when the span search holds a quote and a ?, then the LIKE patterns are bound, not written into the SQL', async () => {
    const q = "it's ? 100%";
    const { result, calls } = await driverCalls(() => surveyor.get(`/api/spans?q=${encodeURIComponent(q)}`));
    expect(result.status).toBe(200);
    expect(result.body.items).toEqual([]);
    const search = calls.filter((c) => c.sql.includes(' like ?'));
    expect(search.length).toBeGreaterThan(0);
    for (const c of calls) expect(c.sql).not.toContain("it's");
    expect(search[0].params).toContain("%it's ? 100\\%%");
  });

  it('when the search text holds a NUL, then the answer is 400 naming q, never a server error', async () => {
    const res = await surveyor.get('/api/spans?q=%00');
    expect(res.status).toBe(400);
    expect(res.body.error.issues[0].path).toBe('q');
  });

  it('when an email with a quote signs in, then the lookup binds it and the answer is the generic refusal', async () => {
    const email = "o'hara@roostline.test";
    const { result, calls } = await driverCalls(() => t.client().post('/api/auth/sign-in', { email, password: 'not the password at all' }));
    expect(result.status).toBe(401);
    expect(calls.some((c) => c.params.includes(email))).toBe(true);
    for (const c of calls) expect(c.sql).not.toContain("o'hara");
  });
});
