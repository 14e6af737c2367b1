import path from 'node:path';
import type { AppContext } from '../../context.ts';
import { featureRouter } from '../../http/access.ts';
import { diskSpace, formatBytes, type DiskSpace } from './disk.ts';

/** Disk figures are read at most once a second, so a busy monitor cannot turn health into load. */
const DISK_CACHE_MS = 1000;
const STORE_CHECK_MS = 10_000;
const STORE_WARNING = 'The photo store cannot be reached: uploads and photo downloads fail until it answers again';

export function healthRouter(ctx: AppContext) {
  const r = featureRouter('/api/health');
  const places = [
    ...(ctx.config.databasePath === ':memory:' || ctx.config.databaseUrl ? [] : [{ holds: 'database', dir: path.dirname(ctx.config.databasePath) }]),
    ...(ctx.storage.kind === 'local' ? [{ holds: 'uploads', dir: ctx.config.uploadsDir }] : []),
  ];
  // An object store is asked (HeadBucket) at most every STORE_CHECK_MS; the local folder is covered by the disk figures.
  let store: { at: number; reachable: boolean } | null = null;
  const storeReachable = async () => {
    if (ctx.storage.kind === 'local') return true;
    if (!store || Date.now() - store.at > STORE_CHECK_MS) {
      const reachable = await ctx.storage.check().then(
        () => true,
        () => false,
      );
      store = { at: Date.now(), reachable };
    }
    return store.reachable;
  };
  let cached: { at: number; disks: DiskSpace[] } | null = null;
  const disks = async () => {
    if (!cached || Date.now() - cached.at > DISK_CACHE_MS) cached = { at: Date.now(), disks: await diskSpace(places) };
    return cached.disks;
  };
  const warnings = (list: DiskSpace[]) =>
    list
      .filter((d) => d.freeBytes < ctx.config.diskWarnBytes)
      .map((d) => `Free disk space for the ${d.holds.join(' and ')} is low: ${formatBytes(d.freeBytes)} left (warning below ${formatBytes(ctx.config.diskWarnBytes)})`);

  // Answers only once the app exists, and the app is created after migrations have run. Healthy: {"status":"ok"};
  // low disk adds `warnings`; a shutdown in progress answers 503 {"status":"draining"}.
  r.get('/', 'public', async (_req, res) => {
    if (ctx.lifecycle.draining) {
      res.status(503).set('Retry-After', '5').json({ status: 'draining' });
      return;
    }
    const w = warnings(await disks());
    if (!(await storeReachable())) w.push(STORE_WARNING);
    res.json(w.length ? { status: 'ok', warnings: w } : { status: 'ok' });
  });

  // The figures behind it, for an operator's monitor.
  r.get('/details', 'public', async (_req, res) => {
    const list = await disks();
    const reachable = await storeReachable();
    res.status(ctx.lifecycle.draining ? 503 : 200).json({
      status: ctx.lifecycle.draining ? 'draining' : 'ok',
      requestsInFlight: ctx.lifecycle.inFlight,
      uptimeS: Math.round(process.uptime()),
      disk: list,
      diskWarnBelowBytes: ctx.config.diskWarnBytes,
      storage: { kind: ctx.storage.kind, reachable },
      warnings: [...warnings(list), ...(reachable ? [] : [STORE_WARNING])],
    });
  });
  return r.router;
}
