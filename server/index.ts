import { loadConfig } from './env.ts';
import { initORM } from './db.ts';
import { createApp } from './app.ts';
import { seedDemoIfEmpty } from './seeders/index.ts';

const config = loadConfig();
const orm = await initORM(config.databasePath);
if (config.seedDemo && (await seedDemoIfEmpty(orm))) console.log('Seeded the demo scenario into an empty database.');
const { app, close } = createApp({ orm, config });
const server = app.listen(config.port, () => {
  console.log(`Roostline is listening on http://localhost:${config.port} (database ${config.databasePath})`);
});

let stopping = false;
async function shutdown(signal: string) {
  if (stopping) return;
  stopping = true;
  console.log(`${signal}: finishing open requests, then closing.`);
  const force = setTimeout(() => process.exit(1), 10_000).unref();
  server.close(async () => {
    await close();
    await orm.close();
    clearTimeout(force);
    process.exit(0);
  });
  server.closeIdleConnections();
}
process.on('SIGTERM', () => void shutdown('SIGTERM'));
process.on('SIGINT', () => void shutdown('SIGINT'));
