// A throwaway PostgreSQL cluster for tests: initdb in a temp folder, pg_ctl on a free loopback port, trust
// authentication, fsync off (a test cluster need not survive a power cut). Nothing depends on a system service.
import { execFileSync, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { freePort } from '../../scripts/free-port.ts';

/** The folder holding initdb/pg_ctl: PG_BIN, else Debian's /usr/lib/postgresql/<newest>/bin; null when absent. */
export function postgresBinDir(): string | null {
  const candidates: string[] = [];
  if (process.env.PG_BIN) candidates.push(process.env.PG_BIN);
  const debian = '/usr/lib/postgresql';
  if (fs.existsSync(debian)) {
    for (const v of fs.readdirSync(debian).sort((a, b) => Number(b) - Number(a))) candidates.push(path.join(debian, v, 'bin'));
  }
  return candidates.find((dir) => fs.existsSync(path.join(dir, 'initdb')) && fs.existsSync(path.join(dir, 'pg_ctl'))) ?? null;
}


export interface Cluster {
  /** postgres://postgres@127.0.0.1:<port>/postgres (the maintenance database). */
  url: string;
  port: number;
  dir: string;
  stop: () => void;
}

/**
 * initdb and pg_ctl refuse to run as root, so under root (a CI container) the cluster runs as the `postgres`
 * account Debian's package creates.
 */
function runAs(): string[] {
  if (process.getuid?.() !== 0) return [];
  const hasUser = spawnSync('id', ['-u', 'postgres']).status === 0;
  if (!hasUser) throw new Error('running as root and there is no postgres account to run the test cluster as');
  return ['runuser', '-u', 'postgres', '--'];
}

export async function startCluster(binDir: string): Promise<Cluster> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'roostline-pg-'));
  const data = path.join(dir, 'data');
  const prefix = runAs();
  if (prefix.length) execFileSync('chown', ['-R', 'postgres:postgres', dir]);
  const run = (bin: string, args: string[]) => {
    const [cmd, ...rest] = prefix.length ? [...prefix, path.join(binDir, bin), ...args] : [path.join(binDir, bin), ...args];
    return execFileSync(cmd, rest, { stdio: ['ignore', 'pipe', 'pipe'], cwd: dir });
  };
  run('initdb', ['-D', data, '-U', 'postgres', '--auth=trust', '-E', 'UTF8', '--locale=C', '--no-sync']);
  const port = await freePort();
  const opts = `-p ${port} -k ${dir} -c listen_addresses=127.0.0.1 -c fsync=off -c synchronous_commit=off -c full_page_writes=off -c max_connections=200`;
  run('pg_ctl', ['-D', data, '-l', path.join(dir, 'log'), '-o', opts, '-w', '-t', '60', 'start']);
  const stop = () => {
    try {
      run('pg_ctl', ['-D', data, '-m', 'immediate', '-w', 'stop']);
    } catch {
      /* already stopped */
    }
    fs.rmSync(dir, { recursive: true, force: true });
  };
  return { url: `postgres://postgres@127.0.0.1:${port}/postgres`, port, dir, stop };
}
