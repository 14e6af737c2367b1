// Areas taken offline: the size estimate of a framed box over a zoom range, the download of its basemap tiles, span
// tiles, records and photo thumbnails, and the list of saved areas on this device (IndexedDB, per user).
// Tiles and thumbnails go into the Cache Storage caches the service worker answers from (src/lib/offline-caches.ts);
// records go into the kept query cache through the record tasks the app composes (src/app/offline-records.ts).
import { createStore, del, get, set } from 'idb-keyval';
import { tileCounts, tileRange, tilesIn, type LonLatBox } from '#shared/tile-math.ts';
import { CACHE_BASEMAP_TILES, CACHE_MAP_DATA, CACHE_PHOTOS, CACHE_SPAN_TILES } from '../../lib/offline-caches.ts';
import { api, qs } from '../../lib/api.ts';
import type { AreaContents } from '#shared/schemas/offline-area.ts';

/** Lowest and highest zoom an area can be taken at (the map opens at 8; span tiles end at 16). */
export const AREA_MIN_ZOOM = 8;
export const AREA_MAX_ZOOM = 16;
/**
 * Most tile places one area may hold (each place is a basemap tile and a span tile). About 4 000 places of the demo
 * region come to some 20–60 MB on the tablet and a few minutes on a slow link; larger frames are refused in words.
 */
export const MAX_AREA_TILES = 4000;
/** Tiles measured per zoom for the estimate (spread over the frame). */
const SAMPLES_PER_ZOOM = 3;
/** Requests in flight at once while downloading. */
const PARALLEL = 4;

/** One step of keeping the records of an area; resolves to the bytes it kept (about). */
export interface RecordTask {
  run: () => Promise<number>;
}
/** The records to keep for an area (composed in src/app, which knows every feature's queries). */
export type RecordPlan = (contents: AreaContents) => RecordTask[];

export interface ZoomEstimate {
  z: number;
  tiles: number;
  /** Measured mean bytes of the basemap tile and the span tile at this zoom (0 when none is fetched there). */
  basemapBytes: number;
  spanBytes: number;
}

export interface AreaEstimate {
  bbox: LonLatBox;
  minZoom: number;
  maxZoom: number;
  zooms: ZoomEstimate[];
  tiles: number;
  tooMany: boolean;
  contents: AreaContents | null;
  tileBytes: number;
  recordBytes: number;
  thumbnailBytes: number;
  totalBytes: number;
}

export interface SavedArea {
  id: string;
  userId: string;
  name: string;
  bbox: LonLatBox;
  minZoom: number;
  maxZoom: number;
  savedAt: string;
  bytes: number;
  tiles: number;
  spans: number;
  structures: number;
  photos: number;
  /** Items that could not be fetched (a refresh tries them again). */
  missed: number;
  /** Every Cache Storage address this area stored, per cache (deleting the area removes those no other area holds). */
  cached: Record<string, string[]>;
}

export interface BasemapZooms {
  minzoom: number;
  maxzoom: number;
}

const origin = () => location.origin;
export const basemapTileUrl = (z: number, x: number, y: number) => `${origin()}/map/basemap/${z}/${x}/${y}.mvt`;
/** The map's span tiles with no filter (src/features/map/map-page.tsx, spanTileUrl). */
export const spanTileUrl = (z: number, x: number, y: number) => `${origin()}/api/tiles/spans/${z}/${x}/${y}.mvt`;
export const thumbnailUrl = (photoId: string) => `${origin()}/api/photos/${encodeURIComponent(photoId)}/thumbnail`;
const MAP_DATA_URLS = () => [`${origin()}/api/zones`, `${origin()}/api/photos/geojson`];

/** Tile places of a frame over a zoom range, and whether that is above the cap. */
export function frameTiles(bbox: LonLatBox, minZoom: number, maxZoom: number) {
  const zooms = tileCounts(bbox, minZoom, maxZoom);
  const tiles = zooms.reduce((a, z) => a + z.count, 0);
  return { zooms, tiles, tooMany: tiles > MAX_AREA_TILES };
}

/** The sentence shown when a frame holds too many tiles. */
export function tooManyMessage(tiles: number, minZoom: number, maxZoom: number) {
  return `This frame needs ${tiles.toLocaleString('en-US').replace(/,/g, ' ')} tiles at zooms ${minZoom}–${maxZoom}; one area holds at most ${MAX_AREA_TILES.toLocaleString('en-US').replace(/,/g, ' ')}. Zoom the map in, draw a smaller box or lower the highest zoom.`;
}

/** Fetches one address (signed in, same origin) and keeps the answer in a cache; resolves to its size in bytes. */
async function keep(cacheName: string, url: string, signal?: AbortSignal): Promise<number> {
  const res = await fetch(url, { credentials: 'same-origin', signal });
  if (!res.ok) throw new Error(`${res.status} for ${url}`);
  const body = await res.arrayBuffer();
  const cache = await caches.open(cacheName);
  // A fresh answer with only its type: no Vary or validators of the network answer to stand in the way of a match.
  await cache.put(url, new Response(body, { status: 200, headers: { 'Content-Type': res.headers.get('Content-Type') ?? 'application/octet-stream' } }));
  return body.byteLength;
}

function spread<T>(items: T[], n: number): T[] {
  if (items.length <= n) return items;
  return Array.from({ length: n }, (_, i) => items[Math.round((i * (items.length - 1)) / (n - 1))]!);
}

/** Tiles of one zoom, in the frame. */
function zoomTiles(bbox: LonLatBox, z: number) {
  const r = tileRange(bbox, z);
  const out: { z: number; x: number; y: number }[] = [];
  for (let x = r.xMin; x <= r.xMax; x++) for (let y = r.yMin; y <= r.yMax; y++) out.push({ z, x, y });
  return out;
}

export function fetchContents(bbox: LonLatBox) {
  return api.get<AreaContents>(`/api/map/area${qs({ bbox: bbox.map((v) => v.toFixed(6)).join(',') })}`);
}

/**
 * The estimate shown before anything is downloaded: tile places per zoom × the mean size of a few tiles measured at
 * that zoom (they are kept, so measuring is not wasted), the records in the frame × the measured size of one span
 * record, and the photos × the measured size of one thumbnail.
 */
export async function estimateArea(bbox: LonLatBox, minZoom: number, maxZoom: number, basemap: BasemapZooms, signal?: AbortSignal): Promise<AreaEstimate> {
  const frame = frameTiles(bbox, minZoom, maxZoom);
  const empty: AreaEstimate = { bbox, minZoom, maxZoom, zooms: frame.zooms.map((z) => ({ z: z.z, tiles: z.count, basemapBytes: 0, spanBytes: 0 })), tiles: frame.tiles, tooMany: frame.tooMany, contents: null, tileBytes: 0, recordBytes: 0, thumbnailBytes: 0, totalBytes: 0 };
  if (frame.tooMany) return empty;
  const contents = await fetchContents(bbox);
  const zooms: ZoomEstimate[] = [];
  for (const { z, count } of frame.zooms) {
    const sample = spread(zoomTiles(bbox, z), SAMPLES_PER_ZOOM);
    const mean = async (cacheName: string, url: (t: { z: number; x: number; y: number }) => string) => {
      const sizes = await Promise.all(sample.map((t) => keep(cacheName, url(t), signal).catch(() => 0)));
      return sizes.reduce((a, b) => a + b, 0) / Math.max(1, sizes.length);
    };
    const basemapBytes = z >= basemap.minzoom && z <= basemap.maxzoom ? await mean(CACHE_BASEMAP_TILES, (t) => basemapTileUrl(t.z, t.x, t.y)) : 0;
    const spanBytes = await mean(CACHE_SPAN_TILES, (t) => spanTileUrl(t.z, t.x, t.y));
    zooms.push({ z, tiles: count, basemapBytes, spanBytes });
  }
  const tileBytes = zooms.reduce((a, z) => a + z.tiles * (z.basemapBytes + z.spanBytes), 0);
  let spanRecord = 0;
  if (contents.spans.length) {
    const res = await fetch(`/api/spans/${encodeURIComponent(contents.spans[0]!.id)}`, { credentials: 'same-origin', signal });
    spanRecord = res.ok ? (await res.arrayBuffer()).byteLength : 0;
  }
  // Each span's record, its photo list and history are kept; lines' structure lists are about a span's worth each.
  const recordBytes = spanRecord * (contents.spans.length * 1.5 + contents.lineIds.length);
  const thumb = contents.photos.length ? await keep(CACHE_PHOTOS, thumbnailUrl(contents.photos[0]!.id), signal).catch(() => 0) : 0;
  const thumbnailBytes = thumb * contents.photos.length;
  return { ...empty, zooms, contents, tileBytes, recordBytes, thumbnailBytes, totalBytes: tileBytes + recordBytes + thumbnailBytes };
}

export interface DownloadProgress {
  done: number;
  total: number;
  bytes: number;
}

/** Downloads an area: its tiles, the map's zones and photo points, its records and thumbnails. */
export async function downloadArea(
  area: { id?: string; userId: string; name: string; bbox: LonLatBox; minZoom: number; maxZoom: number },
  basemap: BasemapZooms,
  plan: RecordPlan,
  onProgress: (p: DownloadProgress) => void,
  signal?: AbortSignal,
): Promise<SavedArea> {
  // Asked once: the browser keeps the saved areas when space runs low (it may still say no; the panel shows which).
  await navigator.storage?.persist?.().catch(() => false);
  const contents = await fetchContents(area.bbox);
  const cached: Record<string, string[]> = { [CACHE_BASEMAP_TILES]: [], [CACHE_SPAN_TILES]: [], [CACHE_PHOTOS]: [], [CACHE_MAP_DATA]: [] };
  const jobs: (() => Promise<number>)[] = [];
  const cacheJob = (cacheName: string, url: string) => {
    cached[cacheName]!.push(url);
    jobs.push(() => keep(cacheName, url, signal));
  };
  let tiles = 0;
  for (const t of tilesIn(area.bbox, area.minZoom, area.maxZoom)) {
    tiles++;
    if (t.z >= basemap.minzoom && t.z <= basemap.maxzoom) cacheJob(CACHE_BASEMAP_TILES, basemapTileUrl(t.z, t.x, t.y));
    cacheJob(CACHE_SPAN_TILES, spanTileUrl(t.z, t.x, t.y));
  }
  for (const url of MAP_DATA_URLS()) cacheJob(CACHE_MAP_DATA, url);
  for (const task of plan(contents)) jobs.push(task.run);
  for (const p of contents.photos) cacheJob(CACHE_PHOTOS, thumbnailUrl(p.id));

  const progress: DownloadProgress = { done: 0, total: jobs.length, bytes: 0 };
  onProgress({ ...progress });
  let missed = 0;
  let next = 0;
  const worker = async () => {
    while (next < jobs.length) {
      if (signal?.aborted) throw new DOMException('The download was stopped', 'AbortError');
      const job = jobs[next++]!;
      try {
        progress.bytes += await job();
      } catch (err) {
        if (signal?.aborted) throw err;
        missed++;
      }
      progress.done++;
      onProgress({ ...progress });
    }
  };
  await Promise.all(Array.from({ length: PARALLEL }, worker));
  return {
    id: area.id ?? crypto.randomUUID(),
    userId: area.userId,
    name: area.name,
    bbox: area.bbox,
    minZoom: area.minZoom,
    maxZoom: area.maxZoom,
    savedAt: new Date().toISOString(),
    bytes: progress.bytes,
    tiles,
    spans: contents.spans.length,
    structures: contents.structures,
    photos: contents.photos.length,
    missed,
    cached,
  };
}

// The list of saved areas, per user, in IndexedDB.
const store = typeof indexedDB !== 'undefined' ? createStore('roostline-areas', 'areas') : undefined;
const listKey = (userId: string) => `areas:${userId}`;

export async function savedAreas(userId: string): Promise<SavedArea[]> {
  if (!store) return [];
  return (await get<SavedArea[]>(listKey(userId), store)) ?? [];
}

/** Saves an area (a refresh replaces the entry of the same id); most recent first. */
export async function saveArea(area: SavedArea): Promise<SavedArea[]> {
  const list = (await savedAreas(area.userId)).filter((a) => a.id !== area.id);
  const next = [area, ...list];
  if (store) await set(listKey(area.userId), next, store);
  return next;
}

/** Deletes an area: its entry, and every tile and thumbnail it stored that no other saved area holds. */
export async function deleteArea(userId: string, id: string): Promise<SavedArea[]> {
  const list = await savedAreas(userId);
  const gone = list.find((a) => a.id === id);
  const rest = list.filter((a) => a.id !== id);
  if (store) await set(listKey(userId), rest, store);
  if (gone && typeof caches !== 'undefined') {
    for (const [cacheName, urls] of Object.entries(gone.cached)) {
      const held = new Set(rest.flatMap((a) => a.cached[cacheName] ?? []));
      const cache = await caches.open(cacheName);
      await Promise.all(urls.filter((u) => !held.has(u)).map((u) => cache.delete(u)));
    }
  }
  return rest;
}

/** Forgets every saved area of this user and the caches behind them (sign-out on a shared tablet). */
export async function clearAreas(userId: string) {
  if (store) await del(listKey(userId), store);
  if (typeof caches !== 'undefined') for (const name of [CACHE_BASEMAP_TILES, CACHE_SPAN_TILES, CACHE_PHOTOS, CACHE_MAP_DATA]) await caches.delete(name);
}

export interface StorageFigures {
  usage: number | null;
  quota: number | null;
  persisted: boolean | null;
}

export async function storageFigures(): Promise<StorageFigures> {
  const s = typeof navigator !== 'undefined' ? navigator.storage : undefined;
  const [est, persisted] = await Promise.all([s?.estimate?.().catch(() => undefined), s?.persisted?.().catch(() => null)]);
  return { usage: est?.usage ?? null, quota: est?.quota ?? null, persisted: persisted ?? null };
}
