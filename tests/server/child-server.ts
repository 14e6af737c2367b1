// A real server process (the same entry `npm start` runs) on a data folder and a free loopback port, for tests
// that kill it, stop it or restart it on the same data.
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import sqlite3 from 'sqlite3';
import { freePort, untilServing } from '../../scripts/free-port.ts';

export { freePort };

export interface ChildServer {
  baseUrl: string;
  proc: ChildProcess;
  log: () => string;
  exited: Promise<number | null>;
}

export const newDataDir = () => fs.mkdtempSync(path.join(os.tmpdir(), 'roostline-durability-'));

export async function startServer(dataDir: string, env: Record<string, string> = {}): Promise<ChildServer> {
  const proc = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    env: {
      ...process.env,
      PORT: '0',
      DATABASE_PATH: path.join(dataDir, 'roostline.sqlite'),
      UPLOADS_DIR: path.join(dataDir, 'uploads'),
      SEED_DEMO: 'true',
      SIGN_IN_BURST: '1000',
      ...env,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let log = '';
  proc.stdout!.on('data', (d) => (log += d));
  proc.stderr!.on('data', (d) => (log += d));
  const exited = new Promise<number | null>((resolve) => proc.once('exit', (code) => resolve(code)));
  const baseUrl = `http://127.0.0.1:${await untilServing(proc, () => log)}`;
  return { baseUrl, proc, log: () => log, exited };
}

/** Signs in and returns the headers a state-changing request needs (session cookie and the app's own Origin). */
export async function signIn(baseUrl: string, role: string): Promise<Record<string, string>> {
  const res = await fetch(`${baseUrl}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'Content-Type': 'application/json', Origin: baseUrl },
    body: JSON.stringify({ email: `${role}@roostline.test`, password: 'roostline-demo' }),
  });
  if (res.status !== 200) throw new Error(`sign-in as ${role}: ${res.status}`);
  const cookie = res.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
  return { Cookie: cookie, Origin: baseUrl };
}

/** Reads the database file directly (server stopped): rows of a query with bound parameters. */
export async function query<T = Record<string, unknown>>(file: string, sql: string, params: unknown[] = []): Promise<T[]> {
  const db = new sqlite3.Database(file);
  try {
    return await new Promise<T[]>((resolve, reject) => db.all(sql, params, (err, rows) => (err ? reject(err) : resolve(rows as T[]))));
  } finally {
    await new Promise((r) => db.close(r));
  }
}
