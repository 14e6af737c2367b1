// A small writer of the open PMTiles v3 format (header, gzip-compressed directories, metadata, tile data),
// enough for a vector basemap. Tile ids, directory layout and header offsets follow the v3 specification;
// the output is checked by reading it back with the `pmtiles` reader (tests/server/map.test.ts).
import { gzipSync } from 'node:zlib';
import { createHash } from 'node:crypto';
import { zxyToTileId } from 'pmtiles';

export interface PmtilesTile {
  z: number;
  x: number;
  y: number;
  /** Tile bytes, already compressed with `tileCompression`. */
  data: Uint8Array;
}

export interface PmtilesOptions {
  tiles: PmtilesTile[];
  metadata: Record<string, unknown>;
  /** [west, south, east, north] in degrees. */
  bounds: [number, number, number, number];
  center: [number, number, number];
  /** 1 = none, 2 = gzip (the default). */
  tileCompression?: 1 | 2;
  /** 1 = MVT. */
  tileType?: number;
}

interface Entry {
  tileId: number;
  offset: number;
  length: number;
  runLength: number;
}

const HEADER_BYTES = 127;
/** The reader fetches the first 16 KiB: header and root directory must fit in it. */
const ROOT_BUDGET = 16384 - HEADER_BYTES;

function writeVarint(out: number[], value: number) {
  let v = value;
  while (v >= 0x80) {
    out.push((v % 0x80) | 0x80);
    v = Math.floor(v / 0x80);
  }
  out.push(v);
}

/** Directory bytes: count, delta-coded tile ids, run lengths, lengths, offsets (0 = contiguous with the previous). */
export function serializeDirectory(entries: Entry[]): Uint8Array {
  const out: number[] = [];
  writeVarint(out, entries.length);
  let last = 0;
  for (const e of entries) {
    writeVarint(out, e.tileId - last);
    last = e.tileId;
  }
  for (const e of entries) writeVarint(out, e.runLength);
  for (const e of entries) writeVarint(out, e.length);
  entries.forEach((e, i) => {
    if (i > 0 && e.offset === entries[i - 1].offset + entries[i - 1].length) writeVarint(out, 0);
    else writeVarint(out, e.offset + 1);
  });
  return Uint8Array.from(out);
}

function writeUint64(view: DataView, at: number, value: number) {
  view.setUint32(at, value % 2 ** 32, true);
  view.setUint32(at + 4, Math.floor(value / 2 ** 32), true);
}

/** Splits the entries into a root directory and leaf directories when the root alone is too big. */
function buildDirectories(entries: Entry[]): { root: Uint8Array; leaves: Uint8Array } {
  const root = gzipSync(serializeDirectory(entries));
  if (root.length <= ROOT_BUDGET) return { root, leaves: new Uint8Array(0) };
  for (let leafSize = 4096; ; leafSize *= 2) {
    const rootEntries: Entry[] = [];
    const leafParts: Buffer[] = [];
    let offset = 0;
    for (let i = 0; i < entries.length; i += leafSize) {
      const leaf = gzipSync(serializeDirectory(entries.slice(i, i + leafSize)));
      rootEntries.push({ tileId: entries[i].tileId, offset, length: leaf.length, runLength: 0 });
      leafParts.push(leaf);
      offset += leaf.length;
    }
    const r = gzipSync(serializeDirectory(rootEntries));
    if (r.length <= ROOT_BUDGET) return { root: r, leaves: Buffer.concat(leafParts) };
  }
}

/** Builds a complete PMTiles v3 archive in memory. Identical tiles are stored once (run-length coded when adjacent). */
export function writePmtiles(opts: PmtilesOptions): Buffer {
  const tiles = opts.tiles.map((t) => ({ ...t, tileId: zxyToTileId(t.z, t.x, t.y) })).sort((a, b) => a.tileId - b.tileId);
  const entries: Entry[] = [];
  const contentOffsets = new Map<string, { offset: number; length: number }>();
  const dataParts: Uint8Array[] = [];
  let dataLength = 0;
  for (const t of tiles) {
    const hash = createHash('sha256').update(t.data).digest('hex');
    let content = contentOffsets.get(hash);
    if (!content) {
      content = { offset: dataLength, length: t.data.length };
      contentOffsets.set(hash, content);
      dataParts.push(t.data);
      dataLength += t.data.length;
    }
    const prev = entries[entries.length - 1];
    if (prev && prev.offset === content.offset && prev.tileId + prev.runLength === t.tileId) prev.runLength += 1;
    else entries.push({ tileId: t.tileId, offset: content.offset, length: content.length, runLength: 1 });
  }
  const { root, leaves } = buildDirectories(entries);
  const metadata = gzipSync(Buffer.from(JSON.stringify(opts.metadata), 'utf8'));

  const rootOffset = HEADER_BYTES;
  const metadataOffset = rootOffset + root.length;
  const leavesOffset = metadataOffset + metadata.length;
  const dataOffset = leavesOffset + leaves.length;
  const zooms = tiles.map((t) => t.z);

  const header = new ArrayBuffer(HEADER_BYTES);
  const view = new DataView(header);
  new Uint8Array(header).set(new TextEncoder().encode('PMTiles'), 0);
  view.setUint8(7, 3);
  writeUint64(view, 8, rootOffset);
  writeUint64(view, 16, root.length);
  writeUint64(view, 24, metadataOffset);
  writeUint64(view, 32, metadata.length);
  writeUint64(view, 40, leavesOffset);
  writeUint64(view, 48, leaves.length);
  writeUint64(view, 56, dataOffset);
  writeUint64(view, 64, dataLength);
  writeUint64(view, 72, tiles.length);
  writeUint64(view, 80, entries.length);
  writeUint64(view, 88, contentOffsets.size);
  view.setUint8(96, 1); // clustered: contents are laid out in tile-id order
  view.setUint8(97, 2); // internal compression: gzip
  view.setUint8(98, opts.tileCompression ?? 2);
  view.setUint8(99, opts.tileType ?? 1);
  view.setUint8(100, Math.min(...zooms));
  view.setUint8(101, Math.max(...zooms));
  const e7 = (deg: number) => Math.round(deg * 1e7);
  view.setInt32(102, e7(opts.bounds[0]), true);
  view.setInt32(106, e7(opts.bounds[1]), true);
  view.setInt32(110, e7(opts.bounds[2]), true);
  view.setInt32(114, e7(opts.bounds[3]), true);
  view.setUint8(118, opts.center[2]);
  view.setInt32(119, e7(opts.center[0]), true);
  view.setInt32(123, e7(opts.center[1]), true);

  return Buffer.concat([Buffer.from(header), root, metadata, leaves, ...dataParts]);
}
