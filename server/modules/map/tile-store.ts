// The span tiles a server had made, kept in one file beside its SQLite database when it stops, so the tiles a
// planner had open come back at once after a restart instead of from their own box query. Each tile is stored
// with the database fingerprint of the snapshot it was made from and is served only while the database still has
// that fingerprint (span-tiles.ts checks); a file written by other tile code (its format key) is ignored.
import crypto from 'node:crypto';
import fs from 'node:fs';
import { fileURLToPath } from 'node:url';

const MAGIC = 'RLT1';

export interface StoredTiles {
  /** The fingerprint (as JSON) each snapshot key's tiles were made from. */
  fps: Record<string, string>;
  tiles: Map<string, Buffer>;
}

/**
 * Identifies the code that makes the tiles: a hash of the tile modules' source, so tiles kept by an older version
 * of the app are never served by a newer one.
 */
export const TILE_FORMAT = (() => {
  const h = crypto.createHash('sha256');
  for (const f of ['./span-tiles.ts', './tile-store.ts']) {
    try {
      h.update(fs.readFileSync(fileURLToPath(new URL(f, import.meta.url))));
    } catch {
      h.update(f);
    }
  }
  return h.digest('hex').slice(0, 16);
})();

/** Writes the tiles (to a temporary file renamed over the old one, so a stop mid-write leaves the old file or none). */
export function writeStoredTiles(file: string, stored: StoredTiles) {
  const entries: [string, number, number][] = [];
  let offset = 0;
  for (const [key, bytes] of stored.tiles) {
    entries.push([key, offset, bytes.length]);
    offset += bytes.length;
  }
  const header = Buffer.from(JSON.stringify({ format: TILE_FORMAT, fps: stored.fps, entries }));
  const head = Buffer.alloc(8);
  head.write(MAGIC, 0, 'ascii');
  head.writeUInt32LE(header.length, 4);
  const tmp = `${file}.${process.pid}.tmp`;
  const fd = fs.openSync(tmp, 'w');
  try {
    fs.writeSync(fd, head);
    fs.writeSync(fd, header);
    for (const bytes of stored.tiles.values()) fs.writeSync(fd, bytes);
  } finally {
    fs.closeSync(fd);
  }
  fs.renameSync(tmp, file);
}

/** Reads the tiles kept in `file`, or null when there are none, the file is damaged or another tile code wrote it. */
export async function readStoredTiles(file: string): Promise<StoredTiles | null> {
  let buf: Buffer;
  try {
    buf = await fs.promises.readFile(file);
  } catch {
    return null;
  }
  try {
    if (buf.length < 8 || buf.toString('ascii', 0, 4) !== MAGIC) return null;
    const len = buf.readUInt32LE(4);
    const header = JSON.parse(buf.toString('utf8', 8, 8 + len)) as { format: string; fps: Record<string, string>; entries: [string, number, number][] };
    if (header.format !== TILE_FORMAT) return null;
    const base = 8 + len;
    const tiles = new Map<string, Buffer>();
    for (const [key, off, n] of header.entries) {
      if (base + off + n > buf.length) return null;
      tiles.set(key, buf.subarray(base + off, base + off + n));
    }
    return { fps: header.fps, tiles };
  } catch {
    return null;
  }
}
