import supertest from 'supertest';
import type { MikroORM } from '@mikro-orm/sqlite';
import { initORM } from '../../server/db.ts';
import { createApp } from '../../server/app.ts';
import { databaseTarget, testConfig, type AppConfig } from '../../server/env.ts';
import { freshPostgresDatabase } from '../postgres/databases.ts';
import { startS3Fake, S3_FAKE_CREDENTIALS } from './s3-fake.ts';
import type { AppStorage } from '../../server/modules/photos/storage.ts';
import { seedDemoUsers, DEMO_PASSWORD } from '../../server/seeders/demo-users.ts';
import type { Role } from '../../shared/roles.ts';

export const HOST = 'roostline.test:3000';
export const ORIGIN = `http://${HOST}`;

export interface TestApp {
  app: ReturnType<typeof createApp>['app'];
  orm: MikroORM;
  config: AppConfig;
  /** The app's file store: the temp uploads folder, or a bucket on a local S3 fake under the object-store run. */
  storage: AppStorage;
  close: () => Promise<void>;
  /** A cookie-keeping client that sends the app's own Host and Origin. */
  client: () => Client;
  /** A client already signed in as the demo account of that role. */
  as: (role: Role) => Promise<Client>;
}

export type Client = ReturnType<typeof makeClient>;

function makeClient(app: TestApp['app']) {
  const agent = supertest.agent(app);
  const withHeaders = (t: supertest.Test) => t.set('Host', HOST).set('Origin', ORIGIN);
  return {
    agent,
    get: (url: string) => agent.get(url).set('Host', HOST),
    post: (url: string, body?: object) => withHeaders(agent.post(url)).send(body ?? {}),
    put: (url: string, body?: object) => withHeaders(agent.put(url)).send(body ?? {}),
    patch: (url: string, body?: object) => withHeaders(agent.patch(url)).send(body ?? {}),
    delete: (url: string) => withHeaders(agent.delete(url)),
    /** A multipart POST; build the body with .attach()/.field() on the returned request. */
    upload: (url: string) => withHeaders(agent.post(url)),
  };
}

/**
 * Which file store test apps get: 's3' under the object-store runs (ROOSTLINE_TEST_STORAGE=s3, set by the
 * vitest project `node-s3` and the PostgreSQL run), else the local folder. Each app then gets its own S3 fake.
 */
export const testStorageKind = (): 'local' | 's3' => (process.env.ROOSTLINE_TEST_STORAGE === 's3' ? 's3' : 'local');

/**
 * A fresh app on its own in-memory database, with the four demo accounts. Under the PostgreSQL run
 * (vitest.postgres.config.ts) the database is a fresh one on the throwaway cluster instead.
 */
export async function makeTestApp(overrides: Partial<AppConfig> = {}, opts: { seed?: (orm: MikroORM) => Promise<void>; demoUsers?: boolean } = {}): Promise<TestApp> {
  const pg = overrides.databaseUrl === undefined ? await freshPostgresDatabase() : null;
  const s3 = overrides.storageUrl === undefined && testStorageKind() === 's3' ? await startS3Fake() : null;
  const config = testConfig({
    ...overrides,
    ...(pg ? { databaseUrl: pg } : {}),
    ...(s3 ? { storageUrl: `s3://${s3.bucket}/app-${process.pid}`, s3Endpoint: s3.endpoint, s3Credentials: S3_FAKE_CREDENTIALS } : {}),
  });
  const orm = await initORM(databaseTarget(config));
  // Off for a database that already holds them (a restored or copied one).
  if (opts.demoUsers !== false) await seedDemoUsers(orm.em.fork());
  if (opts.seed) await opts.seed(orm);
  const { app, close, ctx } = createApp({ orm, config, clientDir: '/nonexistent' });
  const client = () => makeClient(app);
  return {
    app,
    orm,
    config,
    storage: ctx.storage,
    client,
    close: async () => {
      await close();
      await orm.close();
      await s3?.close();
    },
    as: async (role) => {
      const c = client();
      const res = await c.post('/api/auth/sign-in', { email: `${role}@roostline.test`, password: DEMO_PASSWORD });
      if (res.status !== 200) throw new Error(`sign-in as ${role} failed: ${res.status} ${JSON.stringify(res.body)}`);
      return c;
    },
  };
}
