import type { EntityManager } from '@mikro-orm/core';
import { generateIdFromEntropySize } from 'lucia';
import { distance, lineString, point, pointToLineDistance } from '@turf/turf';
import { Span } from '../inventory/span.entity.ts';
import { Structure } from '../inventory/structure.entity.ts';
import { audit } from '../audit/audit.service.ts';
import { usesPostgis } from '../../sql/postgis.ts';
import { sql } from '../../sql/query.ts';
import { Photo } from './photo.entity.ts';
import type { PhotoStorage } from './photo.storage.ts';
import type { ProcessedPhoto } from './photo.pipeline.ts';
import type { PhotoView } from '#shared/schemas/photos.ts';

/** How far from a span's line a photo may be and still be suggested for it, m. */
export const SUGGEST_WITHIN_M = 60;
/** Longest span looked for around a photo, m (prefilter box only; the distance test is exact). */
const LONGEST_SPAN_M = 3000;

export type PhotoVariant = 'original' | 'display' | 'thumbnail';
export const VARIANT_SUFFIX: Record<PhotoVariant, string> = { original: '.original', display: '.display.jpg', thumbnail: '.thumb.jpg' };

export const variantKey = (photo: Pick<Photo, 'storageKey'>, v: PhotoVariant) => photo.storageKey + VARIANT_SUFFIX[v];

export type PhotoApi = PhotoView;

export function toApi(p: Photo): PhotoApi {
  const base = `/api/photos/${p.id}`;
  return {
    id: p.id,
    spanId: p.spanId,
    hazardId: p.hazardId,
    uploaderId: p.uploaderId,
    lat: p.lat,
    lon: p.lon,
    altitudeM: p.altitudeM,
    bearingDeg: p.bearingDeg,
    bearingRef: p.bearingRef,
    takenAt: p.takenAt,
    takenAtHasOffset: p.takenAtHasOffset,
    positionSource: p.positionSource,
    contentType: p.contentType,
    width: p.width,
    height: p.height,
    bytes: p.bytes,
    thumbnailUrl: `${base}/thumbnail`,
    displayUrl: `${base}/display`,
    originalUrl: `${base}/original`,
    createdAt: p.createdAt.toISOString(),
  };
}

/**
 * Spans whose line between their two structures passes within SUGGEST_WITHIN_M of the point, nearest first.
 * Distances are on the sphere both ways: with PostGIS, ST_DWithin/ST_Distance on geography (spheroid off) over the
 * spans' GiST index; otherwise turf's great-circle point-to-segment distance over the structures near the point.
 */
export async function suggestSpans(em: EntityManager, lat: number, lon: number): Promise<{ spanId: string; distanceM: number }[]> {
  const out = (await usesPostgis(em)) ? await spansNearPointPostgis(em, lat, lon) : await spansNearPointJs(em, lat, lon);
  return out.sort((x, y) => x.distanceM - y.distanceM || x.spanId.localeCompare(y.spanId));
}

/** Degrees of latitude and longitude that cover `m` metres around `lat` (a prefilter box; the distance test is exact). */
function boxDegrees(lat: number, m: number) {
  return { dLat: m / 111_000, dLon: m / (111_000 * Math.max(Math.cos((lat * Math.PI) / 180), 0.01)) };
}

async function spansNearPointPostgis(em: EntityManager, lat: number, lon: number) {
  // The box is a little wider than the reach (111 km per degree is a round figure); ST_DWithin decides.
  const { dLat, dLon } = boxDegrees(lat, SUGGEST_WITHIN_M * 1.5);
  const rows = await sql.all<{ id: string; d: number }>(
    em,
    'with p as (select ST_SetSRID(ST_MakePoint(?, ?), 4326) as g) ' +
      'select s.id, ST_Distance(s.geom::geography, p.g::geography, false) as d from spans s, p ' +
      'where s.geom && ST_Expand(p.g, ?, ?) and ST_DWithin(s.geom::geography, p.g::geography, ?, false)',
    [lon, lat, dLon, dLat, SUGGEST_WITHIN_M],
  );
  return rows.map((r) => ({ spanId: r.id, distanceM: Number(r.d) }));
}

async function spansNearPointJs(em: EntityManager, lat: number, lon: number) {
  const { dLat, dLon } = boxDegrees(lat, LONGEST_SPAN_M + SUGGEST_WITHIN_M);
  const near = await em.find(Structure, { lat: { $gte: lat - dLat, $lte: lat + dLat }, lon: { $gte: lon - dLon, $lte: lon + dLon } });
  if (!near.length) return [];
  const ids = near.map((s) => s.id);
  const spans = await em.find(Span, { $or: [{ fromStructureId: { $in: ids } }, { toStructureId: { $in: ids } }] });
  const byId = new Map(near.map((s) => [s.id, s]));
  const missing = [...new Set(spans.flatMap((s) => [s.fromStructureId, s.toStructureId]).filter((id) => !byId.has(id)))];
  if (missing.length) for (const s of await em.find(Structure, { id: { $in: missing } })) byId.set(s.id, s);
  const pt = point([lon, lat]);
  const out: { spanId: string; distanceM: number }[] = [];
  for (const span of spans) {
    const a = byId.get(span.fromStructureId);
    const b = byId.get(span.toStructureId);
    if (!a || !b) continue;
    const distanceM =
      a.lat === b.lat && a.lon === b.lon
        ? distance(pt, point([a.lon, a.lat]), { units: 'meters' })
        : pointToLineDistance(pt, lineString([[a.lon, a.lat], [b.lon, b.lat]]), { units: 'meters', method: 'geodesic' });
    if (distanceM <= SUGGEST_WITHIN_M) out.push({ spanId: span.id, distanceM });
  }
  return out;
}

/** Both paths, for the test that holds them equal on the same data. */
export const suggestSpansBy = { postgis: spansNearPointPostgis, javascript: spansNearPointJs };

/**
 * Writes the files, then the rows (with their audit entries) in one flush. When anything fails, every file
 * this call wrote is deleted again, so a failed request leaves nothing behind.
 */
export async function storePhotos(
  em: EntityManager,
  storage: PhotoStorage,
  items: ProcessedPhoto[],
  opts: { uploaderId: string; spanId: string | null; hazardId: string | null },
): Promise<Photo[]> {
  const written: string[] = [];
  try {
    const photos: Photo[] = [];
    for (const item of items) {
      const id = generateIdFromEntropySize(10);
      const photo = em.create(Photo, {
        id,
        spanId: opts.spanId,
        hazardId: opts.hazardId,
        uploaderId: opts.uploaderId,
        lat: item.lat,
        lon: item.lon,
        altitudeM: item.altitudeM,
        bearingDeg: item.bearingDeg,
        bearingRef: item.bearingRef,
        takenAt: item.takenAt,
        takenAtHasOffset: item.takenAtHasOffset,
        positionSource: item.lat !== null ? 'exif' : null,
        contentType: item.contentType,
        width: item.width,
        height: item.height,
        bytes: item.bytes,
        storageKey: `photos/${id}`,
        createdAt: new Date(),
      });
      for (const [variant, data, type] of [
        ['original', item.original, item.contentType],
        ['display', item.display, 'image/jpeg'],
        ['thumbnail', item.thumbnail, 'image/jpeg'],
      ] as const) {
        const key = variantKey(photo, variant);
        written.push(key);
        await storage.put(key, data, type);
      }
      audit(em, { actorId: opts.uploaderId, action: 'photo.upload', recordType: 'photo', recordId: id, after: snapshot(photo) });
      photos.push(photo);
    }
    await em.flush();
    return photos;
  } catch (err) {
    em.clear();
    await Promise.allSettled(written.map((k) => storage.delete(k)));
    throw err;
  }
}

/** The fields an audit entry records for a photo. */
export function snapshot(p: Photo) {
  return { spanId: p.spanId, hazardId: p.hazardId, lat: p.lat, lon: p.lon, positionSource: p.positionSource, contentType: p.contentType, bytes: p.bytes };
}

/** Photo ids per span, oldest first, for the span API's `photoIds`. */
export async function photoIdsForSpans(em: EntityManager, spanIds: string[]): Promise<Map<string, string[]>> {
  const map = new Map<string, string[]>(spanIds.map((id) => [id, []]));
  if (!spanIds.length) return map;
  const rows = await em.find(Photo, { spanId: { $in: spanIds } }, { fields: ['id', 'spanId', 'createdAt'], orderBy: { createdAt: 'asc', id: 'asc' } });
  for (const r of rows) map.get(r.spanId!)?.push(r.id);
  return map;
}

/** Deletes the row (audited) and then its files. */
export async function deletePhoto(em: EntityManager, storage: PhotoStorage, photo: Photo, actorId: string) {
  audit(em, { actorId, action: 'photo.delete', recordType: 'photo', recordId: photo.id, before: snapshot(photo) });
  em.remove(photo);
  await em.flush();
  await Promise.allSettled((Object.keys(VARIANT_SUFFIX) as PhotoVariant[]).map((v) => storage.delete(variantKey(photo, v))));
}

/**
 * Deletes stored files no photo row refers to (left by a crash between writing files and saving the row,
 * or a temp file of an interrupted write). Only files older than `olderThanMs` go, so uploads in flight are safe.
 */
export async function sweepOrphans(em: EntityManager, storage: PhotoStorage, olderThanMs = 60 * 60_000, now = new Date()): Promise<string[]> {
  if (!storage.list) return [];
  const keys = (await storage.list('photos/')).filter((k) => now.getTime() - k.modifiedAt.getTime() > olderThanMs);
  if (!keys.length) return [];
  const idOf = (key: string) => key.slice('photos/'.length).split('.')[0];
  const ids = [...new Set(keys.map((k) => idOf(k.key)))];
  const known = new Set<string>();
  for (let i = 0; i < ids.length; i += 500) {
    const rows = await em.find(Photo, { id: { $in: ids.slice(i, i + 500) } }, { fields: ['id'] });
    for (const r of rows) known.add(r.id);
  }
  const removed: string[] = [];
  for (const { key } of keys) {
    if (known.has(idOf(key)) && !key.endsWith('.tmp')) continue;
    await storage.delete(key);
    removed.push(key);
  }
  return removed;
}
