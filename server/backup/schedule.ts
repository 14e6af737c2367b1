// The scheduled daily backup: with BACKUP_DIR set, one backup a day after BACKUP_HOUR_UTC into
// BACKUP_DIR/roostline-<UTC time>, keeping the newest BACKUP_KEEP. A day missed while the server was down is made up
// at the next check after start.
import fs from 'node:fs';
import path from 'node:path';
import type { AppContext } from '../context.ts';
import { backupName, createBackup, pruneBackups } from './backup.ts';

const CHECK_EVERY_MS = 10 * 60_000;

/** Whether a backup is due now: none yet today (UTC) and the hour has come, or the newest is over a day old. */
export function backupDue(dir: string, hourUtc: number, now = new Date()): boolean {
  const names = fs.existsSync(dir) ? fs.readdirSync(dir).filter((n) => /^roostline-\d{8}T\d{6}Z$/.test(n)).sort() : [];
  const newest = names.at(-1);
  if (!newest) return now.getUTCHours() >= hourUtc;
  const m = newest.match(/^roostline-(\d{4})(\d\d)(\d\d)T(\d\d)(\d\d)(\d\d)Z$/)!;
  const at = Date.UTC(+m[1], +m[2] - 1, +m[3], +m[4], +m[5], +m[6]);
  const today = now.toISOString().slice(0, 10).replace(/-/g, '');
  if (now.getTime() - at > 26 * 3600_000) return true;
  return now.getUTCHours() >= hourUtc && !newest.startsWith(`roostline-${today}`);
}

export function scheduleDailyBackups(ctx: AppContext): () => void {
  const dir = ctx.config.backupDir;
  // On PostgreSQL the database is backed up with the database's own tools (pg_dump, the provider's snapshots).
  if (!dir || ctx.config.databasePath === ':memory:' || ctx.config.databaseUrl) return () => undefined;
  let running: Promise<void> | null = null;
  const check = () => {
    if (running || ctx.lifecycle.draining || !backupDue(dir, ctx.config.backupHourUtc)) return;
    const out = path.join(dir, backupName());
    running = createBackup({ databasePath: ctx.config.databasePath, storage: ctx.storage, outDir: out })
      .then((m) => {
        const gone = pruneBackups(dir, ctx.config.backupKeep);
        console.log(`backup: wrote ${out} (${m.files.length} photo files)${gone.length ? `; removed ${gone.length} older` : ''}`);
      })
      .catch((err) => console.error('backup: the scheduled backup failed', err))
      .finally(() => (running = null));
  };
  const first = setTimeout(check, 60_000);
  const timer = setInterval(check, CHECK_EVERY_MS);
  first.unref();
  timer.unref();
  return () => {
    clearTimeout(first);
    clearInterval(timer);
  };
}
