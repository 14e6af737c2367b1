// `npm run db:copy` as an operator runs it: the demo inventory and a photo in an SQLite file with its uploads
// folder, copied into a fresh PostgreSQL database (the run's throwaway cluster, tests/postgres/cluster.ts) and the
// files into a bucket of a local S3 fake; then the counts, a few records, the photo's bytes and a sign-in on the
// target through the API; a second copy is refused without --force; a changed target fails --check.
import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from '../server/helpers.ts';
import { query } from '../server/child-server.ts';
import { startS3Fake, S3_FAKE_CREDENTIALS, type S3Fake } from '../server/s3-fake.ts';
import { freshPostgresDatabase } from './databases.ts';
import { seedDemoIfEmpty } from '../../server/seeders/index.ts';
import { LINE_69 } from '../server/inventory-fixtures.ts';

const run = promisify(execFile);
let dir: string;
let sourcePath: string;
let uploadsDir: string;
let target: string;
let fake: S3Fake;
const bucketUrl = () => `s3://${fake.bucket}/moved`;
const copyEnv = () => ({
  ...process.env,
  UPLOADS_DIR: uploadsDir,
  S3_ENDPOINT: fake.endpoint,
  AWS_ACCESS_KEY_ID: S3_FAKE_CREDENTIALS.accessKeyId,
  AWS_SECRET_ACCESS_KEY: S3_FAKE_CREDENTIALS.secretAccessKey,
  AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: 'true',
});
const dbCopy = (args: string[]) => run(process.execPath, ['--import', 'tsx', 'scripts/db-copy.ts', ...args], { env: copyEnv(), maxBuffer: 16 * 1024 * 1024 });
const failing = (p: Promise<unknown>) => p.then(() => ({ code: 0, stdout: '', stderr: '' }), (err: { code: number; stdout: string; stderr: string }) => err);

/** Every table but the migrations' own, as the source lists them. */
async function sourceCounts(): Promise<Record<string, number>> {
  const tables = await query<{ name: string }>(sourcePath, "select name from sqlite_master where type = 'table' and name not like 'sqlite_%' and name != 'mikro_orm_migrations'");
  const out: Record<string, number> = {};
  for (const { name } of tables) out[name] = (await query<{ n: number }>(sourcePath, `select count(*) as n from "${name}"`))[0].n;
  return out;
}
async function targetCounts(tables: string[]): Promise<Record<string, number>> {
  const c = new pg.Client({ connectionString: target });
  await c.connect();
  try {
    const out: Record<string, number> = {};
    for (const t of tables) out[t] = Number((await c.query(`select count(*) as n from "${t}"`)).rows[0].n);
    return out;
  } finally {
    await c.end();
  }
}

/** What the source app answered, to compare with the target's answers. */
const seen: { spanId: string; span: unknown; spansTotal: number; photo: Record<string, unknown>; original: Buffer; lineId: string; permissions: unknown } = {} as never;

beforeAll(async () => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'roostline-copy-'));
  sourcePath = path.join(dir, 'roostline.sqlite');
  uploadsDir = path.join(dir, 'uploads');
  // The demo scenario (accounts, inventory, assessments, permissions, a mission) in an SQLite file, files on disk.
  const t = await makeTestApp({ databasePath: sourcePath, databaseUrl: null, uploadsDir, storageUrl: null }, { demoUsers: false, seed: async (orm) => void (await seedDemoIfEmpty(orm)) });
  try {
    const surveyor = await t.as('surveyor');
    const list = await surveyor.get('/api/spans?limit=5');
    seen.spanId = list.body.items[0].id;
    seen.spansTotal = list.body.total;
    const jpeg = fs.readFileSync(path.resolve('tests/fixtures/photos/nearAb.jpg'));
    const up = await surveyor.upload('/api/photos').attach('photo', jpeg, { filename: 'field.jpg', contentType: 'image/jpeg' }).field('spanId', seen.spanId);
    expect(up.status).toBe(201);
    seen.photo = up.body;
    seen.original = jpeg;
    seen.span = (await surveyor.get(`/api/spans/${seen.spanId}`)).body;
    seen.lineId = (seen.span as { lineId: string }).lineId;
    seen.permissions = (await surveyor.get(`/api/lines/${seen.lineId}/permissions`)).body;
  } finally {
    await t.close();
  }
  target = (await freshPostgresDatabase())!;
  fake = await startS3Fake();
}, 180_000);

afterAll(async () => {
  await fake?.close();
  if (dir) fs.rmSync(dir, { recursive: true, force: true });
});

describe('npm run db:copy', () => {
  it('when the inventory is copied to PostgreSQL and the files to a bucket, then every table and file matches and the target serves the same records', async () => {
    const res = await dbCopy(['--from', sourcePath, '--to', target, '--storage', bucketUrl()]);
    expect(res.stdout).toMatch(/Every table and file matches/);
    // Without a terminal the progress is one line per finished phase.
    expect(res.stderr).toMatch(/table spans: \d+ copied/);
    expect(res.stderr).toMatch(/files: 3 copied/);

    const src = await sourceCounts();
    expect(src.spans).toBeGreaterThan(10);
    expect(src.photos).toBe(1);
    expect(await targetCounts(Object.keys(src))).toEqual(src);
    // With PostGIS the geometry columns are the database's own: filled on the target for every copied row.
    const c = new pg.Client({ connectionString: target });
    await c.connect();
    try {
      const geomTables = (await c.query("select table_name from information_schema.columns where table_schema = current_schema() and udt_name = 'geometry'")).rows.map((r) => r.table_name as string);
      for (const table of geomTables) expect(Number((await c.query(`select count(*) as n from "${table}" where geom is null`)).rows[0].n), `${table} rows without geometry`).toBe(0);
      // PostGIS's own table of reference systems is untouched.
      if (geomTables.length) expect(Number((await c.query('select count(*) as n from spatial_ref_sys')).rows[0].n)).toBeGreaterThan(1000);
    } finally {
      await c.end();
    }

    const t = await makeTestApp({ databaseUrl: target, storageUrl: bucketUrl(), s3Endpoint: fake.endpoint, s3Credentials: S3_FAKE_CREDENTIALS }, { demoUsers: false });
    try {
      // The copied password hashes sign in through the API.
      const planner = await t.as('planner');
      expect((await planner.get('/api/me')).status).toBe(200);
      expect((await planner.get(`/api/spans/${seen.spanId}`)).body).toEqual(seen.span);
      expect((await planner.get('/api/spans?limit=5')).body.total).toBe(seen.spansTotal);
      expect((await planner.get(`/api/lines/${seen.lineId}/permissions`)).body).toEqual(seen.permissions);
      const photo = await planner.get(`/api/photos/${seen.photo.id}`);
      expect(photo.body).toEqual(seen.photo);
      const original = await planner.get(`/api/photos/${seen.photo.id}/original`).buffer(true);
      expect(Buffer.from(original.body).equals(seen.original)).toBe(true);
      expect((await planner.get(`/api/photos/${seen.photo.id}/thumbnail`)).status).toBe(200);
      // Identity and sequences carry on: a new record saves on the target.
      const surveyor = await t.as('surveyor');
      expect((await surveyor.post('/api/lines', { ...LINE_69, name: 'After the move' })).status).toBe(201);
    } finally {
      await t.close();
    }
  }, 240_000);

  it('when the target already holds data, then a second copy is refused unless --force, which replaces it', async () => {
    const before = await targetCounts(['lines', 'spans']);
    const refused = await failing(dbCopy(['--from', sourcePath, '--to', target]));
    expect(refused.code).toBe(1);
    expect(refused.stderr).toMatch(/already holds data.*--force/s);
    expect(await targetCounts(['lines', 'spans'])).toEqual(before);

    const forced = await dbCopy(['--from', sourcePath, '--to', target, '--force']);
    expect(forced.stdout).toMatch(/Every table matches/);
    expect(forced.stdout).toMatch(/files: not copied; they stay in/);
    const src = await sourceCounts();
    expect(await targetCounts(Object.keys(src))).toEqual(src);
  }, 240_000);

  it('when the target differs from the source afterwards, then --check names the table and exits 1', async () => {
    const c = new pg.Client({ connectionString: target });
    await c.connect();
    await c.query('delete from photos');
    await c.end();
    const res = await failing(dbCopy(['--from', sourcePath, '--to', target, '--check']));
    expect(res.code).toBe(1);
    expect(res.stdout).toMatch(/photos\s+1\s+0\s+← differs/);
    expect(res.stderr).toMatch(/does not match the source/);
  }, 120_000);

  it('when the command line is incomplete or names no PostgreSQL, then it says how to call it and exits 2', async () => {
    const res = await failing(dbCopy(['--from', sourcePath, '--to', 'mysql://x']));
    expect(res.code).toBe(2);
    expect(res.stderr).toMatch(/Usage: npm run db:copy/);
  });
});
