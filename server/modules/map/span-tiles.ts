// Span and structure vector tiles, generated from the database. The spans (with their default-pair assessment)
// are read once into memory per data version (in chunks) and bucketed on a grid; a full-detail tile projects only
// the spans that touch it, and a generalised tile (below FULL_DETAIL_ZOOM) reads its cells from that zoom's layer,
// built once per data version and patched on edits. Until the snapshot is read, tiles from DIRECT_MIN_ZOOM up come
// from their own box query. Tiles are cached per data version; any span/structure/assessment change starts a new one.
// On SQLite the cached tiles are kept in a file beside the database when the service closes (tile-store.ts); after
// a restart, until the snapshot is read, a kept tile is served while the database still has its fingerprint.
//
// Interface (kept stable for other tile paths behind it, e.g. a PostGIS one): tile(), bounds(), syncNow(),
// invalidate(), close(); plainTile(), layersReady() and stats for tests and the bench.
import type { EntityManager } from '@mikro-orm/core';
import { tileLat, tileLon } from '#shared/tile-math.ts';
import type { MikroORM } from '@mikro-orm/sqlite';
import vtpbf from 'vt-pbf';
import { defaultAssessmentPair, tableExists } from '../inventory/inventory.service.ts';
import { dataVersion } from '../../sql/data-version.ts';
import { marks, sql } from '../../sql/query.ts';
import { usesPostgis } from '../../sql/postgis.ts';
import { postgisSpanTile } from './postgis-tiles.ts';
import { isPostgres } from '../../sql/dialect.ts';
import { readStoredTiles, writeStoredTiles, type StoredTiles } from './tile-store.ts';

export const TILE_EXTENT = 4096;
/** Tile buffer in tile units (as in the basemap): features this close outside the tile are included. */
const TILE_BUFFER = 64;
/** From this zoom up every span is its own feature; below it, spans close together are generalised. */
export const FULL_DETAIL_ZOOM = 12;
/** Structures are drawn from this zoom up (they would be a smear below it). */
export const STRUCTURE_MIN_ZOOM = 13;
/** Generalisation cell at zoom 11, tile units (128/4096 ≈ 16 px of a 512 px tile); twice that at zoom 10 and below. */
const GENERAL_CELL = 128;
/** Grid bucket of the in-memory index, degrees. */
const GRID_DEG = 0.01;
/** The database fingerprint (catches changes made without a listener, e.g. background rescoring) is read this often, in the background. */
const FINGERPRINT_EVERY_MS = 2000;
const MAX_CACHED_TILES = 4000;
/** And at most this many bytes of them (low-zoom tiles of a dense network are large); least recently used out. */
const MAX_CACHED_BYTES = 64 * 1024 * 1024;

/** The filters the map shares with the spans table (same names as its URL parameters). */
export interface SpanMapFilters {
  status?: string;
  lineId?: string;
  minHarvestW?: number;
  minScore?: number;
}

export interface TilePair {
  harvesterProfileId: string;
  droneProfileId: string;
}

interface Snapshot {
  /** Live spans (entries are patched in place or appended). */
  n: number;
  ids: string[];
  index: Map<string, number>;
  lineIds: string[];
  statuses: string[];
  lon0: number[];
  lat0: number[];
  lon1: number[];
  lat1: number[];
  /** Web-mercator positions (0–1) of the two ends, as the tiles use them. */
  mx0: number[];
  my0: number[];
  mx1: number[];
  my1: number[];
  lengthM: number[];
  /** NaN = no assessment. */
  score: number[];
  harvestW: number[];
  /** -1 = no assessment. */
  perchable: number[];
  grid: Map<number, number[]>;
  /** Span entries per line (a line filter reads only these). */
  lineSpans: Map<string, number[]>;
  /** Generalised zooms (below FULL_DETAIL_ZOOM), built on first use and patched with the snapshot. */
  layers: (GeneralLayer | undefined)[];
  structures: { id: string; lineId: string; lon: number; lat: number; kind: string; label: string }[];
  structureIndex: Map<string, number>;
  structureGrid: Map<number, number[]>;
  pair: TilePair | null;
  /** One copy of each repeated string (line ids, statuses, kinds): a million rows otherwise hold a million copies. */
  names: Map<string, string>;
  /** The database fingerprint this snapshot is current with. */
  fp: Fingerprint;
}

interface Fingerprint {
  sc: number;
  su: unknown;
  tc: number;
  tu: unknown;
  ac: number;
  au: unknown;
}

interface LonLatBox {
  west: number;
  south: number;
  east: number;
  north: number;
}

/** Spans (and cells) a generalised layer takes in per turn of the event loop while it is built. */
const LAYER_CHUNK = 50_000;
/** Rows per query while a snapshot is read. */
const SNAPSHOT_CHUNK = 5_000;
/** From this zoom up, a tile asked for before the snapshot is read is answered from its own box query. */
export const DIRECT_MIN_ZOOM = 10;
/** Metres to degrees of latitude, rounded down (a degree is 110.57–111.69 km), so boxes come out a little large. */
const M_PER_DEG = 110_000;

function emptySnapshot(pair: TilePair | null, fp: Fingerprint): Snapshot {
  return {
    n: 0,
    ids: [],
    index: new Map(),
    lineIds: [],
    statuses: [],
    lon0: [],
    lat0: [],
    lon1: [],
    lat1: [],
    mx0: [],
    my0: [],
    mx1: [],
    my1: [],
    lengthM: [],
    score: [],
    harvestW: [],
    perchable: [],
    grid: new Map(),
    lineSpans: new Map(),
    layers: [],
    structures: [],
    structureIndex: new Map(),
    structureGrid: new Map(),
    pair,
    names: new Map(),
    fp,
  };
}

function named(snap: Snapshot, v: string): string {
  const had = snap.names.get(v);
  if (had !== undefined) return had;
  snap.names.set(v, v);
  return v;
}

/** Generalised zooms built in the background once a snapshot is read: those a planner opens the map at (lower ones on first use). */
const WARM_ZOOMS = [8, 9, 10, 11, 7, 6];
const pairKey = (pair: TilePair | null) => (pair ? `${pair.harvesterProfileId}|${pair.droneProfileId}` : '-');
/** The snapshot key a cached tile's key starts with (`pairKey/filters/z/x/y`). */
const snapKeyOf = (tileKey: string) => tileKey.slice(0, tileKey.indexOf('/'));

const sameFp = (a: Fingerprint, b: Fingerprint) => JSON.stringify(a) === JSON.stringify(b);
/** Above this many changed spans a snapshot is re-read whole rather than patched. */
const PATCH_LIMIT = 20_000;

const STATUS_INDEX: Record<string, number> = { draft: 0, submitted: 1, approved: 2, returned: 3, suspended: 4 };
const gridKey = (gx: number, gy: number) => gx * 100000 + gy;
const gx = (lon: number) => Math.floor((lon + 180) / GRID_DEG);
const gy = (lat: number) => Math.floor((lat + 90) / GRID_DEG);

function mercX(lon: number) {
  return (lon + 180) / 360;
}
function mercY(lat: number) {
  const s = Math.sin((lat * Math.PI) / 180);
  return 0.5 - Math.log((1 + s) / (1 - s)) / (4 * Math.PI);
}

export interface TileStats {
  builds: number;
  hits: number;
  snapshotLoads: number;
  /** Generalised zoom layers built whole (edits patch them instead). */
  layerBuilds: number;
  /** Tiles answered from their own box query while the snapshot (or that zoom's layer) was still being built. */
  directTiles: number;
  /** Tiles answered from those kept when the service last closed (the database unchanged since). */
  keptTiles: number;
}

type VtFeature = { type: 1 | 2; geometry: unknown; tags: Record<string, unknown> };

/** One per app: builds, caches and invalidates the span tiles of that app's database. */
export class SpanTileService {
  private version = 1;
  private snapshots = new Map<string, Promise<Snapshot>>();
  /** The snapshots of `snapshots` that are read (same keys). */
  private loaded = new Map<string, Snapshot>();
  private cache = new Map<string, Buffer>();
  private cacheBytes = 0;
  /** The database's data version at the last sync: an unchanged version needs no fingerprint (its counts scan tables). */
  private seenVersion: string | null = null;
  private syncing: Promise<void> = Promise.resolve();
  private watcher: NodeJS.Timeout | null = null;
  private closed = false;
  private defaultPair: Promise<TilePair | null> | null = null;
  /** The fingerprint the cached PostGIS tiles are current with (null: none made since the last new version). */
  private postgisFp: Fingerprint | null = null;
  readonly stats: TileStats = { builds: 0, hits: 0, snapshotLoads: 0, layerBuilds: 0, directTiles: 0, keptTiles: 0 };
  /** The file the tiles are kept in between runs (SQLite on a file only). */
  private readonly keptFile: string | null;
  private kept: Promise<StoredTiles | null> | null = null;
  /** Set once anything may have changed the tiles through this service: kept tiles are not served after it. */
  private keptOff = false;
  /** The database's data version when its fingerprint was last read for the kept tiles, and that fingerprint. */
  private keptCheck: { version: string; fp: string } | null = null;

  constructor(private readonly orm: MikroORM) {
    const dbName = String(orm.config.get('dbName') ?? '');
    this.keptFile = !isPostgres(orm.em) && dbName && dbName !== ':memory:' && !dbName.startsWith('file:') ? `${dbName}.tiles` : null;
  }

  /** Starts a new data version: every cached tile and snapshot is dropped. */
  invalidate() {
    this.stopKept();
    this.version += 1;
    this.snapshots.clear();
    this.loaded.clear();
    this.clearCache();
    this.seenVersion = null;
    this.defaultPair = null;
    this.postgisFp = null;
  }

  get dataVersion() {
    return this.version;
  }

  /** Reads the database's data fingerprint (counts and latest change times of spans, structures, assessments). */
  private async readFingerprint(em: EntityManager): Promise<Fingerprint> {
    const hasAssessments = await tableExists(em, 'assessments');
    const [row] = await sql.all<any>(
        em,
        'select (select count(*) from spans) as sc, (select max(updated_at) from spans) as su, (select count(*) from structures) as tc, (select max(updated_at) from structures) as tu' +
          (hasAssessments ? ', (select count(*) from assessments) as ac, (select max(computed_at) from assessments) as au' : ''),
      );
    // SQLite answers the stored epoch milliseconds, PostgreSQL a Date: kept as a value that compares with === and
    // binds back into `where updated_at > ?` on both (an ISO string is read as timestamptz by PostgreSQL).
    const t = (v: unknown) => (v instanceof Date ? v.toISOString() : (v ?? null));
    return { sc: Number(row.sc), su: t(row.su), tc: Number(row.tc), tu: t(row.tu), ac: Number(row.ac ?? 0), au: t(row.au) };
  }

  /**
   * Brings every loaded snapshot up to date with the database: the spans changed since its fingerprint are
   * re-read and patched in (a deletion re-reads the snapshot whole); cached tiles are dropped when anything changed.
   * Span writes call it right after saving; a background watcher calls it every FINGERPRINT_EVERY_MS.
   */
  syncNow(): Promise<void> {
    // A write through this app: kept tiles are not trusted from here on (the fingerprint would catch it too).
    this.stopKept();
    return this.syncInBackground();
  }

  private syncInBackground(): Promise<void> {
    this.syncing = this.syncing.then(() => this.sync()).catch((err) => console.error('span tile sync failed', err));
    return this.syncing;
  }

  private async sync() {
    if (this.closed || (this.snapshots.size === 0 && this.postgisFp === null)) return;
    const em = this.orm.em.fork();
    // Read before the fingerprint: a write after it moves the version again, so the next sync looks.
    const version = await dataVersion(em);
    if (version === this.seenVersion) return;
    const next = await this.readFingerprint(em);
    this.seenVersion = version;
    let changed = false;
    for (const [key, promise] of [...this.snapshots]) {
      const snap = await promise.catch(() => null);
      if (!snap || this.snapshots.get(key) !== promise || sameFp(snap.fp, next)) continue;
      changed = true;
      const ok = await this.patch(em, snap, next).catch(() => false);
      if (!ok) this.dropSnapshot(key);
    }
    if (this.postgisFp && !sameFp(this.postgisFp, next)) changed = true;
    if (this.postgisFp) this.postgisFp = next;
    if (changed) {
      this.version += 1;
      this.clearCache();
      this.defaultPair = null;
    }
  }

  private clearCache() {
    this.cache.clear();
    this.cacheBytes = 0;
  }

  /** Patches one snapshot from `snap.fp` up to `next`; false when it must be re-read whole instead. */
  private async patch(em: EntityManager, snap: Snapshot, next: Fingerprint): Promise<boolean> {
    const old = snap.fp;
    if (next.sc < old.sc || next.tc < old.tc || next.ac < old.ac) return false;
    const spanIds = new Set<string>();
    // Rows changed after the snapshot's latest change time, plus those stamped with exactly that time (a write in
    // the same millisecond as the reading) unless a bulk write stamped very many rows with it: those were read.
    const since = async (table: string, column: string, value: unknown, columns: string): Promise<any[]> => {
      if (value === null) return sql.all<any>(em, `select ${columns} from ${table}`);
      const later = await sql.all<any>(em, `select ${columns} from ${table} where ${column} > ?`, [value]);
      const [{ n }] = await sql.all<{ n: number }>(em, `select count(*) as n from ${table} where ${column} = ?`, [value]);
      if (Number(n) <= 1000) later.push(...(await sql.all<any>(em, `select ${columns} from ${table} where ${column} = ?`, [value])));
      return later;
    };
    if (old.su !== next.su || old.sc !== next.sc) for (const r of await since('spans', 'updated_at', old.su, 'id')) spanIds.add(r.id);
    const structures: any[] = old.tu === next.tu && old.tc === next.tc ? [] : await since('structures', 'updated_at', old.tu, 'id, line_id, lon, lat, kind, label');
    const movedIds = structures.map((t) => t.id as string);
    for (let i = 0; i < movedIds.length; i += 400) {
      const chunk = movedIds.slice(i, i + 400);
      const list = marks(chunk.length);
      for (const r of await sql.all<any>(em, `select id from spans where from_structure_id in (${list}) or to_structure_id in (${list})`, [...chunk, ...chunk])) spanIds.add(r.id);
    }
    if ((old.ac !== next.ac || old.au !== next.au) && (await tableExists(em, 'assessments'))) {
      for (const r of await since('assessments', 'computed_at', old.au, 'span_id')) spanIds.add(r.span_id);
    }
    if (spanIds.size > PATCH_LIMIT || structures.length > PATCH_LIMIT) return false;
    const ids = [...spanIds];
    const rows: any[] = [];
    for (let i = 0; i < ids.length; i += 400) rows.push(...(await this.spanRows(em, snap.pair, ids.slice(i, i + 400))));
    // Every query done: apply the changes in one synchronous step (no tile is built from a half-patched snapshot).
    for (const t of structures) upsertStructure(snap, t);
    for (const r of rows) upsertSpan(snap, r);
    snap.fp = next;
    // A span or structure deleted while another was added keeps the counts level: re-read whole then.
    return snap.n === next.sc && snap.structures.length === next.tc;
  }

  /**
   * The rows a snapshot is made of: the given spans; or one chunk of spans in id order after `after.id`; or the
   * spans whose first structure lies in `box` (the covering index on structure positions finds them).
   */
  private async spanRows(em: EntityManager, pair: TilePair | null, ids?: string[], after?: { id: string; limit: number }, box?: LonLatBox): Promise<any[]> {
    const withAssessment = pair && (await tableExists(em, 'assessments'));
    const params: unknown[] = withAssessment ? [pair!.harvesterProfileId, pair!.droneProfileId] : [];
    let where = '';
    if (ids) {
      where = ` where s.id in (${marks(ids.length)})`;
      params.push(...ids);
    } else if (after) {
      where = ' where s.id > ? order by s.id limit ?';
      params.push(after.id, after.limit);
    } else if (box) {
      where = ' where a.lat between ? and ? and a.lon between ? and ?';
      params.push(box.south, box.north, box.west, box.east);
    }
    return sql.all<any>(
      em,
      'select s.id, s.line_id, s.status, s.length_m, a.lon as lon0, a.lat as lat0, b.lon as lon1, b.lat as lat1' +
        (withAssessment ? ', x.score, x.harvest_w, x.perchable' : '') +
        ' from spans s join structures a on a.id = s.from_structure_id join structures b on b.id = s.to_structure_id' +
        (withAssessment ? ' left join assessments x on x.span_id = s.id and x.harvester_profile_id = ? and x.drone_profile_id = ?' : '') +
        where,
      params,
    );
  }

  /**
   * Watches the fingerprint in the background (never on a tile request), so changes made without a listener
   * (background rescoring, another process) also start a new data version within FINGERPRINT_EVERY_MS.
   */
  private ensureWatcher() {
    if (this.watcher || this.closed) return;
    this.watcher = setInterval(() => void this.syncInBackground(), FINGERPRINT_EVERY_MS);
    this.watcher.unref();
  }

  /** Stops the background watcher (the app is closing) and keeps the cached tiles for the next start. */
  close() {
    if (this.closed) return;
    this.closed = true;
    if (this.watcher) clearInterval(this.watcher);
    this.watcher = null;
    try {
      this.keepTiles();
    } catch (err) {
      console.error('span tiles not kept for the next start', err);
    }
  }

  /** Writes the cached tiles made from read snapshots, each snapshot key with the fingerprint its tiles came from. */
  private keepTiles() {
    if (!this.keptFile) return;
    const fps: Record<string, string> = {};
    for (const [key, snap] of this.loaded) if (this.snapshots.has(key)) fps[key] = JSON.stringify(snap.fp);
    const tiles = new Map<string, Buffer>();
    for (const [key, bytes] of this.cache) {
      if (fps[snapKeyOf(key)] !== undefined) tiles.set(key, bytes);
    }
    if (tiles.size) writeStoredTiles(this.keptFile, { fps, tiles });
  }

  /** Kept tiles are never served again by this service; their bytes are let go. */
  private stopKept() {
    this.keptOff = true;
    this.kept = null;
  }

  /**
   * A tile kept when the service last closed, while this start has no snapshot (or layer) to make it from: only
   * while nothing was written through this service and the database's fingerprint is the one the tile was made
   * from (read again whenever the database's data version moved, so another process's commit counts too).
   */
  private async keptTile(key: string): Promise<Buffer | null> {
    if (!this.keptFile || this.keptOff) return null;
    this.kept ??= readStoredTiles(this.keptFile);
    const kept = await this.kept;
    const bytes = kept?.tiles.get(key);
    const wanted = kept?.fps[snapKeyOf(key)];
    if (!bytes || !wanted) return null;
    const em = this.orm.em.fork();
    const version = await dataVersion(em);
    if (this.keptCheck?.version !== version) this.keptCheck = { version, fp: JSON.stringify(await this.readFingerprint(em)) };
    if (this.keptOff || this.keptCheck.fp !== wanted) return null;
    this.stats.keptTiles += 1;
    return bytes;
  }

  private async resolvePair(em: EntityManager, pair: Partial<TilePair>): Promise<TilePair | null> {
    if (pair.harvesterProfileId && pair.droneProfileId) return pair as TilePair;
    if (!this.defaultPair) {
      const p = defaultAssessmentPair(em);
      this.defaultPair = p;
      p.catch(() => (this.defaultPair = null));
    }
    return this.defaultPair;
  }

  private dropSnapshot(key: string) {
    this.snapshots.delete(key);
    this.loaded.delete(key);
  }

  private loadSnapshot(pair: TilePair | null): Promise<Snapshot> {
    const key = pairKey(pair);
    let p = this.snapshots.get(key);
    if (!p) {
      const promise = (p = this.readSnapshot(pair));
      this.snapshots.set(key, promise);
      promise.then(
        (snap) => {
          if (this.snapshots.get(key) !== promise) return;
          this.loaded.set(key, snap);
          void this.warmLayers(key, promise, snap);
        },
        () => {
          if (this.snapshots.get(key) === promise) this.dropSnapshot(key);
        },
      );
    }
    return p;
  }

  /** Builds the generalised layers of a fresh snapshot in the background, one zoom after another (the map's usual zooms first). */
  private async warmLayers(key: string, promise: Promise<Snapshot>, snap: Snapshot) {
    for (const z of WARM_ZOOMS) {
      if (this.closed || this.snapshots.get(key) !== promise) return;
      await layerOf(snap, z, this.stats).ready;
    }
  }

  /**
   * A tile from its own box query, for the first tiles after a start while the snapshot is read: the spans whose
   * first structure lies in the tile's buffered box widened by the longest span (and, at generalised zooms, by one
   * cell) are all the spans that can meet the tile or share a cell with one that does, so the plain path over
   * them gives the same features as over the whole snapshot (a test compares them).
   */
  private async directTile(pair: TilePair | null, z: number, x: number, y: number, filters: SpanMapFilters): Promise<Buffer> {
    this.stats.directTiles += 1;
    const em = this.orm.em.fork();
    const statuses = Object.keys(STATUS_INDEX);
    const [{ m }] = await sql.all<{ m: number | null }>(
      em,
      `select max(m) as m from (${statuses.map(() => 'select max(length_m) as m from spans where status = ?').join(' union all ')}) as t`,
      statuses,
    );
    const widen = ((Number(m) || 0) * 1.1 + 10) / M_PER_DEG;
    const pad = (TILE_BUFFER + (z < FULL_DETAIL_ZOOM ? cellSizeAt(z) : 0)) / TILE_EXTENT;
    const north = tileLat(y - pad, z);
    const south = tileLat(y + 1 + pad, z);
    const cos = Math.cos((Math.min(89, Math.max(Math.abs(north), Math.abs(south)) + widen) * Math.PI) / 180);
    const box = { west: tileLon(x - pad, z) - widen / cos, east: tileLon(x + 1 + pad, z) + widen / cos, south: south - widen, north: north + widen };
    const snap = emptySnapshot(pair, { sc: 0, su: null, tc: 0, tu: null, ac: 0, au: null });
    for (const r of await this.spanRows(em, pair, undefined, undefined, box)) upsertSpan(snap, r);
    if (z >= STRUCTURE_MIN_ZOOM) {
      const tp = TILE_BUFFER / TILE_EXTENT;
      const rows = await sql.all<any>(em, 'select id, line_id, lon, lat, kind, label from structures where lat between ? and ? and lon between ? and ?', [
        tileLat(y + 1 + tp, z),
        tileLat(y - tp, z),
        tileLon(x - tp, z),
        tileLon(x + 1 + tp, z),
      ]);
      for (const t of rows) upsertStructure(snap, t);
    }
    return Buffer.from(buildTile(snap, z, x, y, filters, true));
  }

  private async readSnapshot(pair: TilePair | null): Promise<Snapshot> {
    this.stats.snapshotLoads += 1;
    const em = this.orm.em.fork();
    // The fingerprint is read first: anything written after it is picked up by the next sync.
    const fp = await this.readFingerprint(em);
    this.ensureWatcher();
    const snap = emptySnapshot(pair, fp);
    // Read in chunks in id order, so the first tiles' own queries (and every other request) get the connection
    // between chunks instead of waiting for the whole read.
    for (let after = ''; ; ) {
      if (this.closed) throw new Error('span tile service closed');
      const rows = await this.spanRows(em, pair, undefined, { id: after, limit: SNAPSHOT_CHUNK });
      for (const r of rows) upsertSpan(snap, r);
      if (rows.length < SNAPSHOT_CHUNK) break;
      after = rows[rows.length - 1].id;
    }
    for (let after = ''; ; ) {
      if (this.closed) throw new Error('span tile service closed');
      const rows = await sql.all<any>(em, 'select id, line_id, lon, lat, kind, label from structures where id > ? order by id limit ?', [after, SNAPSHOT_CHUNK]);
      for (const t of rows) upsertStructure(snap, t);
      if (rows.length < SNAPSHOT_CHUNK) break;
      after = rows[rows.length - 1].id;
    }
    return snap;
  }

  /** How many spans pass the map's filters and the box around them (for "fit to results"). */
  async bounds(filters: SpanMapFilters, pair: Partial<TilePair> = {}): Promise<{ count: number; bbox: [number, number, number, number] | null }> {
    const em = this.orm.em.fork();
    const snap = await this.loadSnapshot(await this.resolvePair(em, pair));
    let count = 0;
    let w = Infinity;
    let s = Infinity;
    let e = -Infinity;
    let n = -Infinity;
    for (let i = 0; i < snap.n; i++) {
      if (!passes(snap, i, filters)) continue;
      count++;
      w = Math.min(w, snap.lon0[i], snap.lon1[i]);
      e = Math.max(e, snap.lon0[i], snap.lon1[i]);
      s = Math.min(s, snap.lat0[i], snap.lat1[i]);
      n = Math.max(n, snap.lat0[i], snap.lat1[i]);
    }
    return { count, bbox: count ? [w, s, e, n] : null };
  }

  /**
   * The MVT bytes of one tile (layers `spans` and, from STRUCTURE_MIN_ZOOM, `structures`). Filters given here are
   * applied before the low-zoom generalisation (so a line or status filter stays exact at every zoom).
   */
  async tile(z: number, x: number, y: number, pair: Partial<TilePair> = {}, filters: SpanMapFilters = {}): Promise<Buffer> {
    const resolved = await this.resolvePair(this.orm.em.fork(), pair);
    const snapKey = pairKey(resolved);
    const key = `${snapKey}/${filterKey(filters)}/${z}/${x}/${y}`;
    const version = this.version;
    const hit = this.cache.get(key);
    if (hit) {
      this.stats.hits += 1;
      // Least recently used goes first: a hit moves to the end.
      this.cache.delete(key);
      this.cache.set(key, hit);
      return hit;
    }
    // Full-detail zooms on PostGIS come from the database's spatial index (cached like the others), no snapshot needed.
    const viaPostgis = z >= FULL_DETAIL_ZOOM ? await this.postgisTile(resolved, z, x, y, filters) : null;
    let snap = this.loaded.get(snapKey);
    const layered = z < FULL_DETAIL_ZOOM && !filters.lineId && filters.minHarvestW === undefined && filters.minScore === undefined;
    // Not read yet (a start) or this zoom's layer still building.
    const unready = !viaPostgis && (!snap || (layered && !snap.layers[z]?.isBuilt));
    if (unready) {
      const kept = await this.keptTile(key);
      if (kept) {
        if (!snap) void this.loadSnapshot(resolved).catch(() => undefined);
        else void layerOf(snap, z, this.stats);
        return kept;
      }
    }
    // Not kept either: from its own query, not cached (no sync watches the database before a snapshot is read),
    // and the snapshot is read meanwhile.
    if (unready && z >= DIRECT_MIN_ZOOM) {
      const bytes = await this.directTile(resolved, z, x, y, filters);
      if (!snap) void this.loadSnapshot(resolved).catch(() => undefined);
      else void layerOf(snap, z, this.stats);
      return bytes;
    }
    let bytes = viaPostgis;
    if (!bytes) {
      snap ??= await this.loadSnapshot(resolved);
      if (layered) await layerOf(snap, z, this.stats).ready;
      bytes = Buffer.from(buildTile(snap, z, x, y, filters, false, this.stats));
    }
    this.stats.builds += 1;
    if (version === this.version) {
      while (this.cache.size && (this.cache.size >= MAX_CACHED_TILES || this.cacheBytes + bytes.length > MAX_CACHED_BYTES)) {
        const [oldest, old] = this.cache.entries().next().value!;
        this.cache.delete(oldest);
        this.cacheBytes -= old.length;
      }
      const prev = this.cache.get(key);
      if (prev) this.cacheBytes -= prev.length;
      this.cache.set(key, bytes);
      this.cacheBytes += bytes.length;
    }
    return bytes;
  }

  /** Resolves when this pair's snapshot is read and all its generalised layers are built. */
  async layersReady(pair: Partial<TilePair> = {}): Promise<void> {
    const snap = await this.loadSnapshot(await this.resolvePair(this.orm.em.fork(), pair));
    for (const z of WARM_ZOOMS) await layerOf(snap, z, this.stats).ready;
  }

  /**
   * The same tile by the plain path (every span of the snapshot looked at for this one tile; never cached): the
   * reference the fast path is tested and benched against.
   */
  async plainTile(z: number, x: number, y: number, pair: Partial<TilePair> = {}, filters: SpanMapFilters = {}): Promise<Buffer> {
    const snap = await this.loadSnapshot(await this.resolvePair(this.orm.em.fork(), pair));
    return Buffer.from(buildTile(snap, z, x, y, filters, true));
  }

  /** A full-detail tile made by PostGIS (ST_AsMVT); null where PostGIS is not in use (SQLite, POSTGIS=off). */
  async postgisTile(pair: TilePair | null, z: number, x: number, y: number, filters: SpanMapFilters = {}): Promise<Buffer | null> {
    const em = this.orm.em.fork();
    if (!(await usesPostgis(em))) return null;
    // Read before the tile: a write after it shows as a new fingerprint to the watcher, which drops the cache.
    if (this.postgisFp === null) this.postgisFp = await this.readFingerprint(em);
    this.ensureWatcher();
    const assessed = pair && (await tableExists(em, 'assessments')) ? pair : null;
    return postgisSpanTile(em, { z, x, y, extent: TILE_EXTENT, buffer: TILE_BUFFER, pair: assessed, filters, withStructures: z >= STRUCTURE_MIN_ZOOM });
  }

  /** The pair tiles carry when the request names none. */
  pairFor(pair: Partial<TilePair> = {}): Promise<TilePair | null> {
    return this.resolvePair(this.orm.em.fork(), pair);
  }
}

function gridCellsOf(lonA: number, latA: number, lonB: number, latB: number): number[] {
  const keys: number[] = [];
  for (let x = gx(Math.min(lonA, lonB)); x <= gx(Math.max(lonA, lonB)); x++) for (let y = gy(Math.min(latA, latB)); y <= gy(Math.max(latA, latB)); y++) keys.push(gridKey(x, y));
  return keys;
}

function addToGrid<K>(grid: Map<K, number[]>, keys: K[], i: number) {
  for (const k of keys) {
    const list = grid.get(k);
    if (list) list.push(i);
    else grid.set(k, [i]);
  }
}

function removeFromGrid(grid: Map<number, number[]>, keys: number[], i: number) {
  for (const k of keys) {
    const list = grid.get(k);
    if (!list) continue;
    const at = list.indexOf(i);
    if (at >= 0) list.splice(at, 1);
  }
}

/** Adds a span row to the snapshot, or replaces the entry of the same id (moving it on the grid, its line and its layers' cells if need be). */
function upsertSpan(snap: Snapshot, r: any) {
  let i = snap.index.get(r.id);
  const fresh = i === undefined;
  if (i === undefined) {
    i = snap.n++;
    snap.index.set(r.id, i);
    snap.ids[i] = r.id;
  } else {
    for (const layer of snap.layers) layer?.remove(i);
    if (snap.lon0[i] !== r.lon0 || snap.lat0[i] !== r.lat0 || snap.lon1[i] !== r.lon1 || snap.lat1[i] !== r.lat1) {
      removeFromGrid(snap.grid, gridCellsOf(snap.lon0[i], snap.lat0[i], snap.lon1[i], snap.lat1[i]), i);
      addToGrid(snap.grid, gridCellsOf(r.lon0, r.lat0, r.lon1, r.lat1), i);
    }
    if (snap.lineIds[i] !== r.line_id) {
      const list = snap.lineSpans.get(snap.lineIds[i]);
      const at = list ? list.indexOf(i) : -1;
      if (at >= 0) list!.splice(at, 1);
      addToGrid(snap.lineSpans, [r.line_id], i);
    }
  }
  snap.lineIds[i] = named(snap, r.line_id);
  snap.statuses[i] = named(snap, r.status);
  snap.lon0[i] = r.lon0;
  snap.lat0[i] = r.lat0;
  snap.lon1[i] = r.lon1;
  snap.lat1[i] = r.lat1;
  snap.mx0[i] = mercX(r.lon0);
  snap.my0[i] = mercY(r.lat0);
  snap.mx1[i] = mercX(r.lon1);
  snap.my1[i] = mercY(r.lat1);
  snap.lengthM[i] = r.length_m;
  snap.score[i] = r.score ?? NaN;
  snap.harvestW[i] = r.harvest_w ?? NaN;
  snap.perchable[i] = r.perchable === null || r.perchable === undefined ? -1 : r.perchable ? 1 : 0;
  if (fresh) {
    addToGrid(snap.grid, gridCellsOf(r.lon0, r.lat0, r.lon1, r.lat1), i);
    addToGrid(snap.lineSpans, [r.line_id], i);
  }
  for (const layer of snap.layers) layer?.add(i);
}

function upsertStructure(snap: Snapshot, t: any) {
  const entry = { id: t.id, lineId: named(snap, t.line_id), lon: t.lon, lat: t.lat, kind: named(snap, t.kind), label: t.label };
  const i = snap.structureIndex.get(t.id);
  if (i === undefined) {
    const at = snap.structures.push(entry) - 1;
    snap.structureIndex.set(t.id, at);
    addToGrid(snap.structureGrid, [gridKey(gx(t.lon), gy(t.lat))], at);
    return;
  }
  const prev = snap.structures[i];
  if (prev.lon !== t.lon || prev.lat !== t.lat) {
    removeFromGrid(snap.structureGrid, [gridKey(gx(prev.lon), gy(prev.lat))], i);
    addToGrid(snap.structureGrid, [gridKey(gx(t.lon), gy(t.lat))], i);
  }
  snap.structures[i] = entry;
}

function filterKey(f: SpanMapFilters) {
  return [f.status ?? '', f.lineId ?? '', f.minHarvestW ?? '', f.minScore ?? ''].join('|');
}

function passes(snap: Snapshot, i: number, f: SpanMapFilters) {
  if (f.status && snap.statuses[i] !== f.status) return false;
  if (f.lineId && snap.lineIds[i] !== f.lineId) return false;
  if (f.minHarvestW !== undefined && !(snap.harvestW[i] >= f.minHarvestW)) return false;
  if (f.minScore !== undefined && !(snap.score[i] >= f.minScore)) return false;
  return true;
}

// ---- Tile geometry -------------------------------------------------------------------------------------------
// Positions are world pixels at the tile's zoom: round(mercator × 2^z × TILE_EXTENT). A tile (x, y) covers
// [x·EXTENT − BUFFER, (x+1)·EXTENT + BUFFER] on each axis; a span is in a tile when its pixel box meets that.

/** Generalisation cell at zoom z, tile units (z ≥ FULL_DETAIL_ZOOM: none). */
export const cellSizeAt = (z: number) => (z <= 10 ? GENERAL_CELL * 2 : GENERAL_CELL);
const worldScale = (z: number) => 2 ** z * TILE_EXTENT;
const pxOf = (m: number, scale: number) => Math.round(m * scale);
/** Whether the pixel range [lo, hi] meets tile t's buffered range on one axis. */
const meets = (lo: number, hi: number, t: number) => hi >= t * TILE_EXTENT - TILE_BUFFER && lo <= (t + 1) * TILE_EXTENT + TILE_BUFFER;
/** The tiles (one axis) whose buffered range meets [lo, hi]. */
const firstTile = (lo: number) => Math.ceil((lo - TILE_EXTENT - TILE_BUFFER) / TILE_EXTENT);
const lastTile = (hi: number) => Math.floor((hi + TILE_BUFFER) / TILE_EXTENT);

function spanTags(snap: Snapshot, i: number): Record<string, unknown> {
  const tags: Record<string, unknown> = { id: snap.ids[i], lineId: snap.lineIds[i], status: snap.statuses[i], lengthM: Math.round(snap.lengthM[i] * 10) / 10 };
  const score = snap.score[i];
  const harvestW = snap.harvestW[i];
  if (!Number.isNaN(score)) tags.score = Math.round(score * 10) / 10;
  if (!Number.isNaN(harvestW)) tags.harvestW = Math.round(harvestW * 100) / 100;
  if (snap.perchable[i] >= 0) tags.perchable = snap.perchable[i] === 1;
  return tags;
}

function spanFeature(snap: Snapshot, i: number, scale: number, x: number, y: number, tags = spanTags(snap, i)): VtFeature {
  const ox = x * TILE_EXTENT;
  const oy = y * TILE_EXTENT;
  return {
    type: 2,
    geometry: [[[pxOf(snap.mx0[i], scale) - ox, pxOf(snap.my0[i], scale) - oy], [pxOf(snap.mx1[i], scale) - ox, pxOf(snap.my1[i], scale) - oy]]],
    tags,
  };
}

function spanMeetsTile(snap: Snapshot, i: number, scale: number, x: number, y: number) {
  const x0 = pxOf(snap.mx0[i], scale);
  const x1 = pxOf(snap.mx1[i], scale);
  if (!meets(Math.min(x0, x1), Math.max(x0, x1), x)) return false;
  const y0 = pxOf(snap.my0[i], scale);
  const y1 = pxOf(snap.my1[i], scale);
  return meets(Math.min(y0, y1), Math.max(y0, y1), y);
}

/** Harvest (and score) as compared when choosing a cell's representative: no assessment ranks lowest. */
const rank = (v: number) => (Number.isNaN(v) ? -Infinity : v);

/** The generalised feature of one cell: its representative span, carrying the count and the cell's best figures. */
function cellFeature(snap: Snapshot, rep: number, count: number, maxH: number, maxS: number, scale: number, x: number, y: number): VtFeature {
  const tags: Record<string, unknown> = { ...spanTags(snap, rep), count };
  if (count > 1) {
    if (maxH > -Infinity) tags.harvestW = Math.round(maxH * 100) / 100;
    if (maxS > -Infinity) tags.score = Math.round(maxS * 10) / 10;
  }
  return spanFeature(snap, rep, scale, x, y, tags);
}

/** The cell key of span i at a generalised zoom: status, then the cell of its midpoint. */
function cellKey(snap: Snapshot, i: number, scale: number, cs: number) {
  const cx = Math.floor((pxOf(snap.mx0[i], scale) + pxOf(snap.mx1[i], scale)) / 2 / cs);
  const cy = Math.floor((pxOf(snap.my0[i], scale) + pxOf(snap.my1[i], scale)) / 2 / cs);
  return (STATUS_INDEX[snap.statuses[i]] ?? 7) * 2 ** 34 + (cx + 1) * 2 ** 17 + (cy + 1);
}

/**
 * The plain path: every span (or the given candidates) looked at for this one tile. Below FULL_DETAIL_ZOOM, spans
 * of one status whose midpoints share a cell are one feature (the best-harvesting span, ties to the lowest id,
 * with the cell's count, best harvest and best score); a cell is in every tile its spans meet. The fast path below
 * gives the same features from layers built once per data version; a test compares the two.
 */
function plainSpanFeatures(snap: Snapshot, z: number, x: number, y: number, filters: SpanMapFilters, candidates?: number[]): VtFeature[] {
  const scale = worldScale(z);
  const list = candidates ?? Array.from({ length: snap.n }, (_, i) => i);
  const out: VtFeature[] = [];
  if (z >= FULL_DETAIL_ZOOM) {
    for (const i of list) if (passes(snap, i, filters) && spanMeetsTile(snap, i, scale, x, y)) out.push(spanFeature(snap, i, scale, x, y));
    return out;
  }
  const cs = cellSizeAt(z);
  const cells = new Map<number, { rep: number; count: number; maxH: number; maxS: number; meets: boolean }>();
  for (const i of list) {
    if (!passes(snap, i, filters)) continue;
    const key = cellKey(snap, i, scale, cs);
    const h = rank(snap.harvestW[i]);
    const s = rank(snap.score[i]);
    const m = spanMeetsTile(snap, i, scale, x, y);
    const c = cells.get(key);
    if (!c) cells.set(key, { rep: i, count: 1, maxH: h, maxS: s, meets: m });
    else {
      if (h > c.maxH || (h === c.maxH && snap.ids[i] < snap.ids[c.rep])) c.rep = i;
      c.maxH = Math.max(c.maxH, h);
      c.maxS = Math.max(c.maxS, s);
      c.count += 1;
      c.meets ||= m;
    }
  }
  for (const c of cells.values()) if (c.meets) out.push(cellFeature(snap, c.rep, c.count, c.maxH, c.maxS, scale, x, y));
  return out;
}

/**
 * One generalised zoom of a snapshot, built once per data version and patched on edits: every span's cell (by
 * status and midpoint), each cell's members as a linked list, its aggregate (representative, count, best harvest
 * and score, pixel box) and, per tile, the cells whose box meets it. A cold tile reads only its own cells.
 */
class GeneralLayer {
  readonly scale: number;
  readonly cs: number;
  private cellOf = new Int32Array(0);
  private next = new Int32Array(0);
  private keys = new Map<number, number>();
  private head: number[] = [];
  private status: number[] = [];
  private count: number[] = [];
  private rep: number[] = [];
  private maxH: number[] = [];
  private maxS: number[] = [];
  private box: number[] = []; // minX, minY, maxX, maxY per cell
  private reg: number[] = []; // registered tile range tx0, ty0, tx1, ty1 per cell (tx1 < tx0: none)
  private tiles = new Map<number, number[]>();
  private dirty = new Set<number>();
  /** Spans below this entry are linked (the build goes in chunks, yielding between them). */
  private cursor = 0;
  private built = false;
  get isBuilt() {
    return this.built;
  }
  /** Resolves when every span is in its cell and every cell filed; edits meanwhile are taken in as they come. */
  readonly ready: Promise<void>;

  constructor(
    readonly z: number,
    private readonly snap: Snapshot,
  ) {
    this.scale = worldScale(z);
    this.cs = cellSizeAt(z);
    this.ready = this.build();
  }

  private async build() {
    for (;;) {
      if (this.cursor < this.snap.n) {
        const end = Math.min(this.snap.n, this.cursor + LAYER_CHUNK);
        this.grow(end);
        while (this.cursor < end) this.link(this.cursor++);
      } else if (this.dirty.size) this.refresh(LAYER_CHUNK);
      else break;
      await new Promise((r) => setImmediate(r));
    }
    this.built = true;
  }

  private grow(n: number) {
    if (n <= this.cellOf.length) return;
    const size = Math.max(n, Math.ceil(this.cellOf.length * 1.5), 1024);
    const cellOf = new Int32Array(size).fill(-1);
    cellOf.set(this.cellOf);
    const next = new Int32Array(size).fill(-1);
    next.set(this.next);
    this.cellOf = cellOf;
    this.next = next;
  }

  /** Links span i into its cell (after the snapshot entry is written); spans the build has not reached yet wait for it. */
  add(i: number) {
    if (!this.built && i >= this.cursor) return;
    this.grow(i + 1);
    this.link(i);
  }

  private link(i: number) {
    const key = cellKey(this.snap, i, this.scale, this.cs);
    let c = this.keys.get(key);
    if (c === undefined) {
      c = this.head.length;
      this.keys.set(key, c);
      this.head.push(-1);
      this.status.push(STATUS_INDEX[this.snap.statuses[i]] ?? 7);
      this.count.push(0);
      this.rep.push(-1);
      this.maxH.push(-Infinity);
      this.maxS.push(-Infinity);
      this.box.push(0, 0, 0, 0);
      this.reg.push(0, 0, -1, -1);
    }
    this.cellOf[i] = c;
    this.next[i] = this.head[c];
    this.head[c] = i;
    this.dirty.add(c);
  }

  /** Unlinks span i from its cell (before the snapshot entry changes). */
  remove(i: number) {
    if (i >= this.cellOf.length) return;
    const c = this.cellOf[i];
    if (c < 0) return;
    if (this.head[c] === i) this.head[c] = this.next[i];
    else {
      let p = this.head[c];
      while (p >= 0 && this.next[p] !== i) p = this.next[p];
      if (p >= 0) this.next[p] = this.next[i];
    }
    this.cellOf[i] = -1;
    this.next[i] = -1;
    this.dirty.add(c);
  }

  /** Recomputes the cells changed since the last refresh and files them under the tiles they now meet. */
  refresh(limit = Infinity) {
    if (this.dirty.size === 0) return;
    const { snap, scale } = this;
    const max = 2 ** this.z - 1;
    let done = 0;
    for (const c of this.dirty) {
      if (done++ >= limit) break;
      this.dirty.delete(c);
      let count = 0;
      let rep = -1;
      let maxH = -Infinity;
      let maxS = -Infinity;
      let minX = Infinity;
      let minY = Infinity;
      let maxX = -Infinity;
      let maxY = -Infinity;
      for (let i = this.head[c]; i >= 0; i = this.next[i]) {
        count++;
        const h = rank(snap.harvestW[i]);
        if (rep < 0 || h > maxH || (h === maxH && snap.ids[i] < snap.ids[rep])) rep = i;
        maxH = Math.max(maxH, h);
        maxS = Math.max(maxS, rank(snap.score[i]));
        const x0 = pxOf(snap.mx0[i], scale);
        const x1 = pxOf(snap.mx1[i], scale);
        const y0 = pxOf(snap.my0[i], scale);
        const y1 = pxOf(snap.my1[i], scale);
        minX = Math.min(minX, x0, x1);
        maxX = Math.max(maxX, x0, x1);
        minY = Math.min(minY, y0, y1);
        maxY = Math.max(maxY, y0, y1);
      }
      this.count[c] = count;
      this.rep[c] = rep;
      this.maxH[c] = maxH;
      this.maxS[c] = maxS;
      if (count === 0) continue;
      this.box[4 * c] = minX;
      this.box[4 * c + 1] = minY;
      this.box[4 * c + 2] = maxX;
      this.box[4 * c + 3] = maxY;
      const tx0 = Math.max(0, firstTile(minX));
      const ty0 = Math.max(0, firstTile(minY));
      const tx1 = Math.min(max, lastTile(maxX));
      const ty1 = Math.min(max, lastTile(maxY));
      const r = 4 * c;
      const had = this.reg[r + 2] >= this.reg[r];
      for (let tx = tx0; tx <= tx1; tx++) {
        for (let ty = ty0; ty <= ty1; ty++) {
          if (had && tx >= this.reg[r] && tx <= this.reg[r + 2] && ty >= this.reg[r + 1] && ty <= this.reg[r + 3]) continue;
          const key = tx * 2 ** 22 + ty;
          const list = this.tiles.get(key);
          if (list) list.push(c);
          else this.tiles.set(key, [c]);
        }
      }
      if (had) {
        this.reg[r] = Math.min(this.reg[r], tx0);
        this.reg[r + 1] = Math.min(this.reg[r + 1], ty0);
        this.reg[r + 2] = Math.max(this.reg[r + 2], tx1);
        this.reg[r + 3] = Math.max(this.reg[r + 3], ty1);
      } else {
        this.reg[r] = tx0;
        this.reg[r + 1] = ty0;
        this.reg[r + 2] = tx1;
        this.reg[r + 3] = ty1;
      }
    }
  }

  /** The generalised features of tile (x, y); `status` keeps the cells of that status only. */
  features(x: number, y: number, status?: string): VtFeature[] {
    this.refresh();
    const only = status ? (STATUS_INDEX[status] ?? -1) : -1;
    const out: VtFeature[] = [];
    for (const c of this.tiles.get(x * 2 ** 22 + y) ?? []) {
      if (this.count[c] === 0 || (only >= 0 && this.status[c] !== only)) continue;
      // A cell once filed here may have moved off since (an edit): its box decides.
      if (!meets(this.box[4 * c], this.box[4 * c + 2], x) || !meets(this.box[4 * c + 1], this.box[4 * c + 3], y)) continue;
      out.push(cellFeature(this.snap, this.rep[c], this.count[c], this.maxH[c], this.maxS[c], this.scale, x, y));
    }
    return out;
  }
}

/** The snapshot's layer for a generalised zoom, built on first use. */
function layerOf(snap: Snapshot, z: number, stats?: TileStats): GeneralLayer {
  let layer = snap.layers[z];
  if (!layer) {
    snap.layers[z] = layer = new GeneralLayer(z, snap);
    if (stats) stats.layerBuilds += 1;
  }
  return layer;
}

/** Spans whose box may meet the tile, from the snapshot's grid (every span when the tile covers most of it). */
function gridCandidates(snap: Snapshot, z: number, x: number, y: number): number[] {
  const pad = TILE_BUFFER / TILE_EXTENT;
  // One grid cell more on each side: the pixel test decides, the grid only narrows.
  const gx0 = gx(tileLon(x - pad, z)) - 1;
  const gx1 = gx(tileLon(x + 1 + pad, z)) + 1;
  const gy0 = gy(tileLat(y + 1 + pad, z)) - 1;
  const gy1 = gy(tileLat(y - pad, z)) + 1;
  const out: number[] = [];
  if ((gx1 - gx0 + 1) * (gy1 - gy0 + 1) > snap.grid.size) {
    for (let i = 0; i < snap.n; i++) out.push(i);
    return out;
  }
  const seen = new Set<number>();
  for (let a = gx0; a <= gx1; a++) {
    for (let b = gy0; b <= gy1; b++) {
      const list = snap.grid.get(gridKey(a, b));
      if (!list) continue;
      for (const i of list) if (!seen.has(i)) (seen.add(i), out.push(i));
    }
  }
  return out;
}

/** The fast path: generalised zooms from their layer, full-detail zooms from the grid; a line filter reads only that line. */
function fastSpanFeatures(snap: Snapshot, z: number, x: number, y: number, filters: SpanMapFilters, stats?: TileStats): VtFeature[] {
  const thresholds = filters.minHarvestW !== undefined || filters.minScore !== undefined;
  if (filters.lineId) return plainSpanFeatures(snap, z, x, y, filters, snap.lineSpans.get(filters.lineId) ?? []);
  // Thresholds in the tile URL (the map itself filters them on the client) generalise after filtering: plain path.
  if (z < FULL_DETAIL_ZOOM) return thresholds ? plainSpanFeatures(snap, z, x, y, filters) : layerOf(snap, z, stats).features(x, y, filters.status);
  return plainSpanFeatures(snap, z, x, y, filters, gridCandidates(snap, z, x, y));
}

function buildTile(snap: Snapshot, z: number, x: number, y: number, filters: SpanMapFilters = {}, plain = false, stats?: TileStats): Uint8Array {
  const spans = plain ? plainSpanFeatures(snap, z, x, y, filters) : fastSpanFeatures(snap, z, x, y, filters, stats);
  const layers: Record<string, { features: VtFeature[] }> = { spans: { features: spans } };
  if (z >= STRUCTURE_MIN_ZOOM) {
    const pad = TILE_BUFFER / TILE_EXTENT;
    const west = tileLon(x - pad, z);
    const east = tileLon(x + 1 + pad, z);
    const north = tileLat(y - pad, z);
    const south = tileLat(y + 1 + pad, z);
    const px = (lon: number) => Math.round((mercX(lon) * 2 ** z - x) * TILE_EXTENT);
    const py = (lat: number) => Math.round((mercY(lat) * 2 ** z - y) * TILE_EXTENT);
    const structures: VtFeature[] = [];
    for (let a = gx(west); a <= gx(east); a++) {
      for (let b = gy(south); b <= gy(north); b++) {
        for (const i of snap.structureGrid.get(gridKey(a, b)) ?? []) {
          const s = snap.structures[i];
          if (s.lon < west || s.lon > east || s.lat < south || s.lat > north) continue;
          structures.push({ type: 1, geometry: [[px(s.lon), py(s.lat)]], tags: { id: s.id, lineId: s.lineId, kind: s.kind, label: s.label } });
        }
      }
    }
    layers.structures = { features: structures };
  }
  return vtpbf.fromGeojsonVt(layers, { version: 2, extent: TILE_EXTENT });
}
