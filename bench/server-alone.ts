// The real server (the entry `npm start` runs) as a child process on a bench's SQLite file: its list latency and
// its own resident memory, apart from the bench's seeding and clients.
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { untilServing } from '../scripts/free-port.ts';
import { DEMO_PASSWORD } from '../server/seeders/demo-users.ts';
import { concurrent, tileOf } from './measure.ts';

export interface ServerAloneFigures {
  list: number[];
  /** VmRSS after start-up, sign-in and the list run, bytes. */
  rssIdle: number;
  /** Highest VmRSS seen while tiles were asked for, and VmRSS when they had all been answered, bytes. */
  rssTilePeak: number;
  rssTileEnd: number;
  tiles: number;
  tileMs: number[];
}

/** Resident set of a process from /proc/<pid>/status (Linux), bytes; null when it cannot be read. */
export function vmRss(pid: number): number | null {
  try {
    const m = /^VmRSS:\s+(\d+)\s+kB/m.exec(fs.readFileSync(`/proc/${pid}/status`, 'utf8'));
    return m ? Number(m[1]) * 1024 : null;
  } catch {
    return null;
  }
}

/** Every child still running, ended if the bench process itself exits early or is stopped by a signal. */
const running = new Set<ChildProcess>();
const killAll = () => {
  for (const child of running) child.kill('SIGKILL');
};
const onSignal = (signal: NodeJS.Signals) => {
  killAll();
  process.exit(signal === 'SIGINT' ? 130 : 143);
};

function track(child: ChildProcess) {
  if (running.size === 0) {
    process.on('exit', killAll);
    process.on('SIGINT', onSignal);
    process.on('SIGTERM', onSignal);
  }
  running.add(child);
}

async function stop(child: ChildProcess, exited: Promise<unknown>) {
  if (child.exitCode === null && child.signalCode === null) {
    child.kill('SIGTERM');
    const timer = setTimeout(() => child.kill('SIGKILL'), 15_000);
    await exited;
    clearTimeout(timer);
  }
  running.delete(child);
  if (running.size === 0) {
    process.off('exit', killAll);
    process.off('SIGINT', onSignal);
    process.off('SIGTERM', onSignal);
  }
}

/**
 * Starts the server on `databaseFile` (already migrated and seeded, with the demo accounts), signs in as the
 * planner, reads the list with 10 concurrent clients (`listUrls` are paths), then asks for tiles over `densest`
 * with 10 clients while its VmRSS is sampled. The child is ended on every path.
 */
export async function measureServerAlone(databaseFile: string, densest: [number, number], listUrls: string[], opts: { listTotal?: number; tileRounds?: number } = {}): Promise<ServerAloneFigures> {
  const uploads = fs.mkdtempSync(path.join(os.tmpdir(), 'roostline-bench-uploads-'));
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    env: { ...process.env, PORT: '0', DATABASE_PATH: databaseFile, UPLOADS_DIR: uploads, SEED_DEMO: 'false', SEED_SCALE_SPANS: '0', SIGN_IN_BURST: '1000', LOG_REQUESTS: 'false', BACKUP_DIR: '' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  track(child);
  const exited = new Promise((resolve) => {
    child.once('exit', resolve);
    child.once('error', resolve);
  });
  let log = '';
  child.stdout!.on('data', (d) => (log = (log + d).slice(-20_000)));
  child.stderr!.on('data', (d) => (log = (log + d).slice(-20_000)));
  try {
    const base = `http://127.0.0.1:${await untilServing(child, () => log, 120_000)}`;
    const signIn = await fetch(`${base}/api/auth/sign-in`, { method: 'POST', headers: { 'content-type': 'application/json', origin: base }, body: JSON.stringify({ email: 'planner@roostline.test', password: DEMO_PASSWORD }) });
    if (!signIn.ok) throw new Error(`sign-in as planner failed: ${signIn.status} ${await signIn.text()}`);
    const cookie = (signIn.headers.get('set-cookie') ?? '').split(';')[0];
    const get = async (url: string) => {
      const res = await fetch(`${base}${url}`, { headers: { cookie } });
      if (!res.ok) throw new Error(`${url}: ${res.status} ${await res.text()}`);
      await res.arrayBuffer();
    };
    const list = await concurrent(10, opts.listTotal ?? 200, (i) => get(listUrls[i % listUrls.length]));
    await new Promise((r) => setTimeout(r, 1000));
    const rssIdle = vmRss(child.pid!) ?? NaN;

    // Tiles over the densest area: a 5 × 5 block at each of z6, z8, z11, z14, asked `tileRounds` times over.
    const [lon, lat] = densest;
    const urls: string[] = [];
    for (const z of [6, 8, 11, 14]) {
      const c = tileOf(lon, lat, z);
      for (let dx = -2; dx <= 2; dx++) for (let dy = -2; dy <= 2; dy++) urls.push(`/api/tiles/spans/${z}/${c.x + dx}/${c.y + dy}.mvt`);
    }
    let rssTilePeak = 0;
    const sample = () => (rssTilePeak = Math.max(rssTilePeak, vmRss(child.pid!) ?? 0));
    const sampler = setInterval(sample, 100);
    const tiles = urls.length * (opts.tileRounds ?? 8);
    let tileMs: number[];
    try {
      tileMs = await concurrent(10, tiles, (i) => get(urls[i % urls.length]));
    } finally {
      clearInterval(sampler);
    }
    sample();
    const rssTileEnd = vmRss(child.pid!) ?? NaN;
    return { list, rssIdle, rssTilePeak, rssTileEnd, tiles, tileMs };
  } finally {
    await stop(child, exited);
    fs.rmSync(uploads, { recursive: true, force: true });
  }
}
