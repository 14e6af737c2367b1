// What "take an area offline" downloads from the server: basemap tiles one by one (so the tablet can keep exactly the
// tiles of its area; the PMTiles file itself is read in byte ranges, which a cache cannot answer), and the list of
// records in a framed box (spans with either structure inside, their lines, the photos of those spans or taken there).
import fs from 'node:fs';
import type { EntityManager } from '@mikro-orm/core';
import { PMTiles, type RangeResponse, type Source } from 'pmtiles';
import { z } from 'zod';
import { sql } from '../../sql/query.ts';
import type { AreaContents } from '#shared/schemas/offline-area.ts';

/** A PMTiles source over a file on disk (reads the byte ranges the reader asks for). */
class FileSource implements Source {
  constructor(private readonly file: string) {}
  getKey() {
    return this.file;
  }
  async getBytes(offset: number, length: number): Promise<RangeResponse> {
    const fd = await fs.promises.open(this.file, 'r');
    try {
      const buf = Buffer.alloc(length);
      const { bytesRead } = await fd.read(buf, 0, length, offset);
      return { data: buf.buffer.slice(buf.byteOffset, buf.byteOffset + bytesRead) as ArrayBuffer };
    } finally {
      await fd.close();
    }
  }
}

const readers = new Map<string, { mtimeMs: number; reader: PMTiles }>();

function readerFor(file: string): PMTiles {
  const { mtimeMs } = fs.statSync(file);
  const known = readers.get(file);
  if (known && known.mtimeMs === mtimeMs) return known.reader;
  const reader = new PMTiles(new FileSource(file));
  readers.set(file, { mtimeMs, reader });
  return reader;
}

/** One basemap tile, decompressed MVT bytes; an empty buffer where the file holds no tile (open sea, outside). */
export async function basemapTile(file: string, z: number, x: number, y: number): Promise<Buffer | null> {
  if (!fs.existsSync(file)) return null;
  const tile = await readerFor(file).getZxy(z, x, y);
  return tile ? Buffer.from(tile.data) : Buffer.alloc(0);
}

const coordinate = (v: number, limit: number) => Number.isFinite(v) && Math.abs(v) <= limit;

/** `bbox=west,south,east,north` in degrees. */
export const areaQuery = z.object({
  bbox: z
    .string({ error: 'bbox is required: west,south,east,north in degrees' })
    .max(200)
    .transform((s) => s.split(',').map((p) => (p.trim() === '' ? NaN : Number(p))))
    .refine((b) => b.length === 4 && coordinate(b[0]!, 180) && coordinate(b[2]!, 180) && coordinate(b[1]!, 90) && coordinate(b[3]!, 90), 'bbox must be four numbers: west,south,east,north in degrees')
    .refine((b) => b[0]! < b[2]! && b[1]! < b[3]!, 'bbox must have west below east and south below north'),
});

/** At most this many spans are listed for one area (the client caps its areas well below this). */
export const AREA_SPAN_LIMIT = 5000;

/** The records in a box: spans with either structure inside it, their lines, and the photos of those spans or taken inside it. */
export async function areaContents(em: EntityManager, bbox: number[]): Promise<AreaContents> {
  const [west, south, east, north] = bbox as [number, number, number, number];
  const inBox = (t: string) => `(${t}.lat >= ? and ${t}.lat <= ? and ${t}.lon >= ? and ${t}.lon <= ?)`;
  const box = [south, north, west, east];
  const spanSql = `select s.id as id, s.line_id as line_id from spans s join structures a on a.id = s.from_structure_id join structures b on b.id = s.to_structure_id where ${inBox('a')} or ${inBox('b')}`;
  const rows = await sql.all<{ id: string; line_id: string }>(em, `${spanSql} order by s.id limit ?`, [...box, ...box, AREA_SPAN_LIMIT + 1]);
  const truncated = rows.length > AREA_SPAN_LIMIT;
  const spans = rows.slice(0, AREA_SPAN_LIMIT).map((r) => ({ id: r.id, lineId: r.line_id }));
  const [{ n }] = await sql.all<{ n: number }>(em, `select count(*) as n from structures t where ${inBox('t')}`, box);
  const photos = await sql.all<{ id: string; span_id: string | null }>(
    em,
    `select p.id as id, p.span_id as span_id from photos p where p.span_id in (select id from (${spanSql}) inside) or ${inBox('p')} order by p.id limit ?`,
    [...box, ...box, ...box, 20_000],
  );
  return {
    spans,
    lineIds: [...new Set(spans.map((s) => s.lineId))].sort(),
    structures: Number(n),
    photos: photos.map((p) => ({ id: p.id, spanId: p.span_id })),
    truncated,
  };
}
