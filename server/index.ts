import type { AddressInfo } from 'node:net';
import { databaseTarget, loadConfig } from './env.ts';
import { initORM, whileHoldingStartLock } from './db.ts';
import { createApp } from './app.ts';
import { seedDemoIfEmpty, seedScaleIfEmpty } from './seeders/index.ts';
import { storageFromConfig } from './modules/photos/storage.ts';
import { sweepOrphans } from './modules/photos/photo.service.ts';
import { claimServerLock, releaseServerLock } from './server-lock.ts';
import { scheduleDailyBackups } from './backup/schedule.ts';

const startedAt = new Date();
/** The address without its password, for the log. */
const redactUrl = (url: string) => url.replace(/\/\/([^:/@]+):[^@]*@/, '//$1:***@');
const config = loadConfig();
// One server per SQLite file; on PostgreSQL several processes share the database by design.
if (!config.databaseUrl) claimServerLock(config.databasePath);
const orm = await initORM(databaseTarget(config));
// Several processes may start at once on one PostgreSQL: one seeds, the others wait for it and find it seeded.
if (config.seedScaleSpans > 0) {
  const seeded = await whileHoldingStartLock(orm, () => seedScaleIfEmpty(orm, config.seedScaleSpans));
  if (seeded) console.log(`Seeded the demo accounts and an invented inventory of ${seeded.spans} spans into an empty database.`);
} else if (config.seedDemo && (await whileHoldingStartLock(orm, () => seedDemoIfEmpty(orm)))) console.log('Seeded the demo scenario into an empty database.');

const storage = storageFromConfig(config);
try {
  await storage.check();
} catch (err) {
  console.error(`The file store ${storage.describe} cannot be reached: ${err instanceof Error ? err.message : err}. Check STORAGE_URL, S3_ENDPOINT and the credentials.`);
  process.exit(1);
}

// Files written before this start that no photo row names were left by a crash mid-upload (files are written
// before the row): with one process nothing can still be on its way to use them, so they go before the first
// request. On PostgreSQL other processes may be uploading right now, so only files over an hour old go.
const removed = await sweepOrphans(orm.em.fork(), storage, config.databaseUrl ? 60 * 60_000 : 0, startedAt).catch((err) => {
  console.error('photos: start-up orphan sweep failed', err);
  return [];
});
if (removed.length) console.log(`photos: removed ${removed.length} file(s) an interrupted upload left behind`);

const { app, ctx, close, lifecycle } = createApp({ orm, config, storage });
const stopBackups = scheduleDailyBackups(ctx);
const server = app.listen(config.port, () => {
  console.log(`Roostline is listening on http://localhost:${(server.address() as AddressInfo).port} (database ${config.databaseUrl ? 'PostgreSQL ' + redactUrl(config.databaseUrl) : config.databasePath}, files in ${storage.describe})`);
});

let stopping = false;
/**
 * SIGTERM/SIGINT: health answers "draining" and new requests get 503 at once; requests in flight get up to
 * SHUTDOWN_GRACE_MS to finish; then background jobs stop at their next batch (their pending record stays, so the
 * next start runs them again), the database is closed (which checkpoints the WAL) and the process exits 0.
 */
async function shutdown(signal: string) {
  if (stopping) return;
  stopping = true;
  lifecycle.draining = true;
  console.log(`${signal}: draining — ${lifecycle.inFlight} request(s) in flight, up to ${config.shutdownGraceMs / 1000} s to finish.`);
  // Should closing itself hang, leave with an error after the grace period and a margin.
  setTimeout(() => {
    console.error('Shutdown did not finish in time; exiting.');
    process.exit(1);
  }, config.shutdownGraceMs + 15_000).unref();
  const finished = await lifecycle.idle(config.shutdownGraceMs);
  if (!finished) console.error(`${lifecycle.inFlight} request(s) still running after ${config.shutdownGraceMs / 1000} s: cutting them.`);
  await new Promise<void>((resolve) => {
    server.close(() => resolve());
    server.closeAllConnections();
  });
  stopBackups();
  await close();
  await orm.close();
  if (!config.databaseUrl) releaseServerLock(config.databasePath);
  console.log('Closed cleanly.');
  process.exit(0);
}
process.on('SIGTERM', () => void shutdown('SIGTERM'));
process.on('SIGINT', () => void shutdown('SIGINT'));
