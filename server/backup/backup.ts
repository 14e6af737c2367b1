// Online backup and restore of the database and the stored files (photos and line-permission documents), from and
// to either store: the uploads folder or an S3 bucket (STORAGE_URL); the backup folder itself is always local.
// Backup: `VACUUM INTO` copies one consistent snapshot of the database while the server goes on writing (in WAL
// mode it is a reader and blocks no writer); then every file the snapshot's photo rows name is copied. A photo
// deleted while the copy ran has no files left to copy: its row is removed from the copy and named in the manifest.
// The manifest holds row counts and SHA-256 of every file, which `verifyBackup` checks.
import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { pipeline } from 'node:stream/promises';
import sqlite3 from 'sqlite3';
import { BUSY_TIMEOUT_MS } from '../db.ts';
import { runningServer } from '../server-lock.ts';
import type { PhotoStorage } from '../modules/photos/photo.storage.ts';
import { localDiskStorage } from '../modules/photos/photo.storage.ts';

export const DB_FILE = 'roostline.sqlite';
export const MANIFEST = 'manifest.json';
const VARIANTS = ['.original', '.display.jpg', '.thumb.jpg'];

export interface Manifest {
  format: 'roostline-backup-1';
  createdAt: string;
  database: { file: string; bytes: number; sha256: string; rows: Record<string, number> };
  files: { key: string; bytes: number; sha256: string }[];
  photosDeletedDuringBackup: string[];
}

class Db {
  private db: sqlite3.Database;
  private constructor(db: sqlite3.Database) {
    this.db = db;
  }
  static open(file: string, mode = sqlite3.OPEN_READWRITE): Promise<Db> {
    return new Promise((resolve, reject) => {
      const db = new sqlite3.Database(file, mode, (err) => (err ? reject(err) : resolve(new Db(db))));
    });
  }
  all<T>(sql: string, params: unknown[] = []): Promise<T[]> {
    return new Promise((resolve, reject) => this.db.all(sql, params, (err, rows) => (err ? reject(err) : resolve(rows as T[]))));
  }
  run(sql: string, params: unknown[] = []): Promise<void> {
    return new Promise((resolve, reject) => this.db.run(sql, params, (err) => (err ? reject(err) : resolve())));
  }
  close(): Promise<void> {
    return new Promise((resolve, reject) => this.db.close((err) => (err ? reject(err) : resolve())));
  }
}

async function sha256(file: string): Promise<{ sha256: string; bytes: number }> {
  const hash = crypto.createHash('sha256');
  let bytes = 0;
  for await (const chunk of fs.createReadStream(file)) {
    hash.update(chunk as Buffer);
    bytes += (chunk as Buffer).length;
  }
  return { sha256: hash.digest('hex'), bytes };
}

async function rowCounts(db: Db): Promise<Record<string, number>> {
  const tables = await db.all<{ name: string }>("select name from sqlite_master where type = 'table' and name not like 'sqlite_%' order by name");
  const out: Record<string, number> = {};
  // Table names come from the database's own catalogue, quoted as identifiers; there is no user input here.
  for (const { name } of tables) out[name] = (await db.all<{ n: number }>(`select count(*) as n from "${name.replace(/"/g, '""')}"`))[0].n;
  return out;
}

async function fsyncFile(file: string) {
  const fh = await fs.promises.open(file, 'r');
  try {
    await fh.sync();
  } finally {
    await fh.close();
  }
}

/** Copies one stored file into the backup folder; false when the store has no such key. */
async function copyOut(storage: PhotoStorage, key: string, to: string): Promise<boolean> {
  const obj = await storage.get(key);
  if (!obj) return false;
  fs.mkdirSync(path.dirname(to), { recursive: true });
  await pipeline(obj.body, fs.createWriteStream(to));
  return true;
}

const DOCUMENT_TYPES: Record<string, string> = { pdf: 'application/pdf', jpg: 'image/jpeg', png: 'image/png', webp: 'image/webp' };
const contentTypeOf = (key: string) =>
  key.endsWith('.original') ? 'application/octet-stream' : key.endsWith('.jpg') ? 'image/jpeg' : (DOCUMENT_TYPES[key.split('.').pop() ?? ''] ?? 'application/octet-stream');

/**
 * Writes a complete backup into `outDir` (created; must not hold one already). Safe while the server runs. Files are
 * read from `storage` (the app's store), or from the folder `uploadsDir` when no store is given.
 */
export async function createBackup(opts: { databasePath: string; uploadsDir?: string; storage?: PhotoStorage; outDir: string }): Promise<Manifest> {
  const storage = opts.storage ?? localDiskStorage(opts.uploadsDir ?? 'uploads');
  const out = path.resolve(opts.outDir);
  if (fs.existsSync(path.join(out, MANIFEST))) throw new Error(`${out} already holds a backup; choose a new folder`);
  const work = `${out}.partial-${process.pid}`;
  fs.rmSync(work, { recursive: true, force: true });
  fs.mkdirSync(path.join(work, 'uploads'), { recursive: true });
  const target = path.join(work, DB_FILE);
  const src = await Db.open(opts.databasePath);
  try {
    await src.run(`PRAGMA busy_timeout = ${BUSY_TIMEOUT_MS}`);
    await src.run('VACUUM INTO ?', [target]);
  } finally {
    await src.close();
  }
  const copy = await Db.open(target);
  const files: Manifest['files'] = [];
  const deleted: string[] = [];
  try {
    const photos = await copy.all<{ id: string; storage_key: string }>('select id, storage_key from photos order by id');
    for (const p of photos) {
      const copied: string[] = [];
      let missing = false;
      for (const v of VARIANTS) {
        const key = p.storage_key + v;
        if (await copyOut(storage, key, path.join(work, 'uploads', key))) copied.push(key);
        else missing = true;
      }
      if (missing) {
        deleted.push(p.id);
        for (const key of copied) fs.rmSync(path.join(work, 'uploads', key), { force: true });
        await copy.run('delete from photos where id = ?', [p.id]);
        continue;
      }
      for (const key of copied) files.push({ key, ...(await sha256(path.join(work, 'uploads', key))) });
    }
    // Attached permission documents: one file each. One replaced while the copy ran is gone from the store; the
    // copy then keeps the permission without a document (the replacement is newer than the snapshot anyway).
    const docs = await copy.all<{ id: string; document_key: string }>('select id, document_key from line_permissions where document_key is not null order by id');
    for (const d of docs) {
      const to = path.join(work, 'uploads', d.document_key);
      if (await copyOut(storage, d.document_key, to)) files.push({ key: d.document_key, ...(await sha256(to)) });
      else
        await copy.run(
          'update line_permissions set document_key = null, document_name = null, document_content_type = null, document_bytes = null where id = ?',
          [d.id],
        );
    }
    const rows = await rowCounts(copy);
    const check = (await copy.all<{ integrity_check: string }>('PRAGMA integrity_check')).map((r) => r.integrity_check).join('\n');
    if (check !== 'ok') throw new Error(`the copied database fails its integrity check: ${check}`);
    await copy.close();
    await fsyncFile(target);
    const manifest: Manifest = {
      format: 'roostline-backup-1',
      createdAt: new Date().toISOString(),
      database: { file: DB_FILE, ...(await sha256(target)), rows },
      files,
      photosDeletedDuringBackup: deleted,
    };
    fs.writeFileSync(path.join(work, MANIFEST), JSON.stringify(manifest, null, 2));
    await fsyncFile(path.join(work, MANIFEST));
    fs.mkdirSync(path.dirname(out), { recursive: true });
    if (fs.existsSync(out)) {
      if (fs.readdirSync(out).length) throw new Error(`${out} is not empty`);
      fs.rmdirSync(out);
    }
    fs.renameSync(work, out);
    return manifest;
  } catch (err) {
    await copy.close().catch(() => undefined);
    fs.rmSync(work, { recursive: true, force: true });
    throw err;
  }
}

/** Checks a backup folder against its manifest: every checksum and the database's integrity. Returns the problems. */
export async function verifyBackup(dir: string): Promise<{ manifest: Manifest | null; problems: string[] }> {
  const problems: string[] = [];
  let manifest: Manifest;
  try {
    manifest = JSON.parse(fs.readFileSync(path.join(dir, MANIFEST), 'utf8'));
  } catch {
    return { manifest: null, problems: [`${dir} holds no readable ${MANIFEST}`] };
  }
  const dbPath = path.join(dir, manifest.database.file);
  if (!fs.existsSync(dbPath)) problems.push('the database file is missing');
  else {
    if ((await sha256(dbPath)).sha256 !== manifest.database.sha256) problems.push('the database file differs from its checksum');
    const db = await Db.open(dbPath, sqlite3.OPEN_READONLY);
    try {
      const check = (await db.all<{ integrity_check: string }>('PRAGMA integrity_check')).map((r) => r.integrity_check).join('\n');
      if (check !== 'ok') problems.push(`integrity check: ${check}`);
    } finally {
      await db.close();
    }
  }
  for (const f of manifest.files) {
    const p = path.join(dir, 'uploads', f.key);
    if (!fs.existsSync(p)) problems.push(`missing file ${f.key}`);
    else if ((await sha256(p)).sha256 !== f.sha256) problems.push(`file ${f.key} differs from its checksum`);
  }
  return { manifest, problems };
}

/**
 * Puts a backup back: the server must be stopped; an existing database is only replaced with `force` (the replaced
 * database and uploads are kept beside them as `*.before-restore-<time>`).
 */
export async function restoreBackup(opts: { from: string; databasePath: string; uploadsDir: string; storage?: PhotoStorage & { kind?: string }; force?: boolean }): Promise<Manifest> {
  const pid = runningServer(opts.databasePath);
  if (pid) throw new Error(`A Roostline server (pid ${pid}) is running on ${opts.databasePath}; stop it before restoring`);
  const { manifest, problems } = await verifyBackup(opts.from);
  if (!manifest || problems.length) throw new Error(`The backup does not verify:\n- ${problems.join('\n- ')}`);
  const exists = fs.existsSync(opts.databasePath) && fs.statSync(opts.databasePath).size > 0;
  if (exists && !opts.force) throw new Error(`${opts.databasePath} exists; add --force to replace it (it is kept beside as *.before-restore-…)`);
  const stamp = new Date().toISOString().replace(/\D/g, '').slice(0, 14);
  fs.mkdirSync(path.dirname(opts.databasePath), { recursive: true });
  const tmpDb = `${opts.databasePath}.restoring`;
  fs.copyFileSync(path.join(opts.from, manifest.database.file), tmpDb);
  await fsyncFile(tmpDb);
  // An object store gets every file put back under its key (keys are unique ids; objects the restored database does
  // not name are left to the orphan sweep). The uploads folder is rebuilt beside the old one and swapped in below.
  const toBucket = opts.storage && opts.storage.kind === 's3' ? opts.storage : null;
  const tmpUploads = `${opts.uploadsDir}.restoring`;
  if (toBucket) {
    for (const f of manifest.files) await toBucket.put(f.key, fs.createReadStream(path.join(opts.from, 'uploads', f.key)), contentTypeOf(f.key));
  } else {
    fs.rmSync(tmpUploads, { recursive: true, force: true });
    fs.mkdirSync(tmpUploads, { recursive: true });
    for (const f of manifest.files) {
      const to = path.join(tmpUploads, f.key);
      fs.mkdirSync(path.dirname(to), { recursive: true });
      fs.copyFileSync(path.join(opts.from, 'uploads', f.key), to);
    }
  }
  if (exists) {
    fs.renameSync(opts.databasePath, `${opts.databasePath}.before-restore-${stamp}`);
  }
  // A write-ahead log of the old database must never be replayed into the restored one.
  for (const suffix of ['-wal', '-shm']) fs.rmSync(opts.databasePath + suffix, { force: true });
  fs.renameSync(tmpDb, opts.databasePath);
  if (!toBucket) {
    if (fs.existsSync(opts.uploadsDir)) fs.renameSync(opts.uploadsDir, `${opts.uploadsDir}.before-restore-${stamp}`);
    fs.renameSync(tmpUploads, opts.uploadsDir);
  }
  return manifest;
}

/** Keeps the newest `keep` backups named `roostline-<stamp>` in `dir`; removes older ones and leftover partial folders. */
export function pruneBackups(dir: string, keep: number): string[] {
  if (!fs.existsSync(dir)) return [];
  const names = fs.readdirSync(dir).filter((n) => /^roostline-\d{8}T\d{6}Z$/.test(n)).sort().reverse();
  const gone = names.slice(keep);
  for (const n of fs.readdirSync(dir).filter((n) => n.includes('.partial-'))) fs.rmSync(path.join(dir, n), { recursive: true, force: true });
  for (const n of gone) fs.rmSync(path.join(dir, n), { recursive: true, force: true });
  return gone;
}

export const backupName = (d = new Date()) => `roostline-${d.toISOString().replace(/[-:]/g, '').replace(/\.\d+Z$/, 'Z')}`;
