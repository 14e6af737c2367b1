// npm run backup -- --out DIR      a consistent copy of the database and the photo files, while the server runs
// npm run backup -- --verify DIR   checks a backup against its manifest (checksums, integrity check)
import { loadConfig } from '../server/env.ts';
import { createBackup, verifyBackup } from '../server/backup/backup.ts';
import { storageFromConfig } from '../server/modules/photos/storage.ts';

const args = process.argv.slice(2);
const arg = (name: string) => (args.indexOf(name) >= 0 ? args[args.indexOf(name) + 1] : undefined);
const config = loadConfig();
if (config.databaseUrl) {
  console.error(
    'DATABASE_URL names a PostgreSQL database: back it up with pg_dump (pg_dump -Fc "$DATABASE_URL" > roostline.dump; restore with pg_restore) ' +
      'or the provider\'s snapshots, and the photos with the object store\'s versioning or a copy of UPLOADS_DIR. This command copies the SQLite file.',
  );
  process.exit(2);
}
try {
  if (arg('--verify')) {
    const { manifest, problems } = await verifyBackup(arg('--verify')!);
    if (problems.length) {
      console.error(`The backup does not verify:\n- ${problems.join('\n- ')}`);
      process.exit(1);
    }
    console.log(`The backup of ${manifest!.createdAt} verifies: ${manifest!.database.rows.spans ?? 0} spans, ${manifest!.files.length} photo files, integrity ok.`);
  } else if (arg('--out')) {
    const m = await createBackup({ databasePath: config.databasePath, storage: storageFromConfig(config), outDir: arg('--out')! });
    console.log(`Backed up ${config.databasePath} to ${arg('--out')}: ${m.database.rows.spans ?? 0} spans, ${m.database.rows.photos ?? 0} photos (${m.files.length} files).`);
    if (m.photosDeletedDuringBackup.length) console.log(`${m.photosDeletedDuringBackup.length} photo(s) deleted while the copy ran are left out.`);
  } else {
    console.error('Usage: npm run backup -- --out DIR   |   npm run backup -- --verify DIR');
    process.exit(2);
  }
} catch (err) {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
}
