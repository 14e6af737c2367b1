// One running server per database file: the server writes `<database>.server.json` (its pid) at start and removes
// it on a clean exit. `npm run restore` refuses to run while the server it names is alive; a second server refuses
// to start. A file left by a killed server names a dead process and is ignored.
import fs from 'node:fs';
import path from 'node:path';

export const lockPath = (databasePath: string) => `${databasePath}.server.json`;

/** The pid of a live server holding this database, or null. */
export function runningServer(databasePath: string): number | null {
  let pid: number;
  try {
    pid = Number(JSON.parse(fs.readFileSync(lockPath(databasePath), 'utf8')).pid);
  } catch {
    return null;
  }
  if (!Number.isInteger(pid) || pid <= 0 || pid === process.pid) return null;
  try {
    process.kill(pid, 0);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== 'EPERM') return null;
  }
  // A pid reused by an unrelated process (after a container restart) is not a server.
  try {
    const cmd = fs.readFileSync(`/proc/${pid}/cmdline`, 'utf8');
    if (!cmd.includes('server/index')) return null;
  } catch {
    /* no /proc: trust the pid */
  }
  return pid;
}

export function claimServerLock(databasePath: string) {
  if (databasePath === ':memory:') return;
  const other = runningServer(databasePath);
  if (other) {
    console.error(`Another Roostline server (pid ${other}) is using ${databasePath}; stop it first.`);
    process.exit(1);
  }
  fs.mkdirSync(path.dirname(databasePath), { recursive: true });
  fs.writeFileSync(lockPath(databasePath), JSON.stringify({ pid: process.pid, startedAt: new Date().toISOString() }));
}

export function releaseServerLock(databasePath: string) {
  if (databasePath === ':memory:') return;
  try {
    if (Number(JSON.parse(fs.readFileSync(lockPath(databasePath), 'utf8')).pid) === process.pid) fs.rmSync(lockPath(databasePath));
  } catch {
    /* already gone */
  }
}
