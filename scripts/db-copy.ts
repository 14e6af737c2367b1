// npm run db:copy -- --from <sqlite file> --to <postgres url> [--storage s3://bucket/prefix] [--uploads DIR] [--force]
//   Copies a whole inventory from an SQLite file into PostgreSQL (and, with --storage, its photo and document files
//   from the uploads folder into an S3 bucket), then checks the row count of every table and every file.
//   --check compares an earlier copy with its source again (counts and files) without copying.
//   Exit 0 when everything matches, 1 on a mismatch or an error, 2 for a wrong command line.
import cliProgress from 'cli-progress';
import { loadConfig } from '../server/env.ts';
import { checkExistingCopy, copyDatabase, CopyRefused, type CopyProgress, type CopyResult } from '../server/copy/db-copy.ts';
import { storageFromConfig } from '../server/modules/photos/storage.ts';

const USAGE = 'Usage: npm run db:copy -- --from <sqlite file> --to <postgres://…> [--storage s3://bucket/prefix] [--uploads DIR] [--force | --check]';
const args = process.argv.slice(2);
const arg = (name: string) => (args.indexOf(name) >= 0 ? args[args.indexOf(name) + 1] : undefined);
const from = arg('--from');
const to = arg('--to');
const storageUrl = arg('--storage');
if (!from || !to || !/^postgres(ql)?:\/\//i.test(to) || (storageUrl !== undefined && !/^s3:\/\//.test(storageUrl))) {
  console.error(USAGE);
  console.error('--to must be a postgres:// address; --storage, when given, an s3:// address (S3_ENDPOINT, S3_REGION and AWS_ACCESS_KEY_ID/AWS_SECRET_ACCESS_KEY as for the server).');
  process.exit(2);
}
const redact = (url: string) => url.replace(/\/\/([^:/@]+):[^@]*@/, '//$1:***@');
const env = loadConfig({ ...process.env, DATABASE_URL: '', STORAGE_URL: '' });
const uploadsDir = arg('--uploads') ? loadConfig({ UPLOADS_DIR: arg('--uploads') }).uploadsDir : env.uploadsDir;
const sourceFiles = storageFromConfig({ ...env, uploadsDir, storageUrl: null });
const targetFiles = storageUrl ? storageFromConfig({ ...loadConfig({ ...process.env, DATABASE_URL: '' }), storageUrl }) : null;

/** A bar on a terminal; one line per finished phase otherwise (CI logs, pipes). */
function progressOut(): CopyProgress & { stop: () => void } {
  const tty = Boolean(process.stderr.isTTY);
  const bar = tty
    ? new cliProgress.SingleBar(
        { format: ' {phase} |{bar}| {percentage}% · {count} / {all}', barCompleteChar: '█', barIncompleteChar: '░', hideCursor: true, clearOnComplete: false, stream: process.stderr },
        cliProgress.Presets.shades_classic,
      )
    : null;
  let phase = '';
  let total = 0;
  let started = 0;
  return {
    start(p, n) {
      phase = p === 'files' ? 'files' : `table ${p}`;
      total = n;
      started = Date.now();
      // An empty table shows as complete, 0 of 0.
      bar?.start(Math.max(n, 1), n === 0 ? 1 : 0, { phase: phase.padEnd(28), count: 0, all: n });
    },
    advance(done) {
      bar?.update(done, { count: done });
    },
    finish() {
      if (bar) bar.stop();
      else console.error(`  ${phase}: ${total} copied (${((Date.now() - started) / 1000).toFixed(1)} s)`);
    },
    stop() {
      bar?.stop();
    },
  };
}

function report(r: CopyResult) {
  const w = Math.max(...r.tables.map((t) => t.table.length), 5);
  console.log(`\n${'table'.padEnd(w)}  ${'SQLite'.padStart(10)}  ${'PostgreSQL'.padStart(10)}`);
  for (const t of r.tables) console.log(`${t.table.padEnd(w)}  ${String(t.source).padStart(10)}  ${String(t.target).padStart(10)}${t.source === t.target ? '' : '  ← differs'}`);
  if (r.files) {
    console.log(`\nfiles: ${r.files.found} of ${r.files.expected} in ${targetFiles!.describe}`);
    for (const k of r.files.missingAtSource.slice(0, 20)) console.log(`  not in ${uploadsDir}: ${k}`);
    for (const k of r.files.missingAtTarget.slice(0, 20)) console.log(`  not in the bucket: ${k}`);
  } else console.log(`\nfiles: not copied; they stay in ${uploadsDir} (give the new servers the same UPLOADS_DIR, or copy with --storage s3://…)`);
}

const progress = progressOut();
console.error(`${args.includes('--check') ? 'Checking' : 'Copying'} ${from} → ${redact(to)}${targetFiles ? `, files ${uploadsDir} → ${targetFiles.describe}` : ''}${args.includes('--force') ? ' (replacing what the target holds)' : ''}`);
try {
  const result = args.includes('--check')
    ? await checkExistingCopy({ from, to, files: targetFiles })
    : await copyDatabase({ from, to, force: args.includes('--force'), files: targetFiles ? { from: sourceFiles, to: targetFiles } : null, progress });
  report(result);
  if (!result.ok) {
    console.error('\nThe copy does not match the source (above). Nothing in the SQLite file was changed; fix the cause and copy again with --force.');
    process.exit(1);
  }
  console.log(`\nEvery table${result.files ? ' and file' : ''} matches. Start the servers with DATABASE_URL=${redact(to)}${targetFiles ? ` and STORAGE_URL=${storageUrl}` : ''}.`);
} catch (err) {
  progress.stop();
  console.error(`\n${err instanceof CopyRefused ? '' : 'The copy failed: '}${err instanceof Error ? err.message : err}`);
  process.exit(1);
}
