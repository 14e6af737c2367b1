// npm run restore -- --from DIR [--force]   puts a backup back (server stopped); --force replaces an existing database
import { loadConfig } from '../server/env.ts';
import { restoreBackup } from '../server/backup/backup.ts';
import { storageFromConfig } from '../server/modules/photos/storage.ts';

const args = process.argv.slice(2);
const from = args.indexOf('--from') >= 0 ? args[args.indexOf('--from') + 1] : undefined;
if (!from) {
  console.error('Usage: npm run restore -- --from DIR [--force]');
  process.exit(2);
}
const config = loadConfig();
if (config.databaseUrl) {
  console.error('DATABASE_URL names a PostgreSQL database: restore it with pg_restore from a pg_dump file. This command restores an SQLite backup folder.');
  process.exit(2);
}
try {
  const m = await restoreBackup({ from, databasePath: config.databasePath, uploadsDir: config.uploadsDir, storage: storageFromConfig(config), force: args.includes('--force') });
  console.log(`Restored the backup of ${m.createdAt} into ${config.databasePath}: ${m.database.rows.spans ?? 0} spans, ${m.files.length} photo files.`);
} catch (err) {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
}
