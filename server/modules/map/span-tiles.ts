// Span and structure vector tiles, generated from the database. The spans (with their default-pair assessment)
// are read once into memory per data version and bucketed on a grid; each tile then projects only the spans
// that touch it. Tiles are cached per data version; any span/structure/assessment change starts a new version.
import type { EntityManager } from '@mikro-orm/core';
import type { MikroORM } from '@mikro-orm/sqlite';
import vtpbf from 'vt-pbf';
import { defaultAssessmentPair, tableExists } from '../inventory/inventory.service.ts';
import { dataVersion } from '../../sql/data-version.ts';
import { marks, sql } from '../../sql/query.ts';

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
  lengthM: number[];
  /** NaN = no assessment. */
  score: number[];
  harvestW: number[];
  /** -1 = no assessment. */
  perchable: number[];
  grid: Map<number, number[]>;
  structures: { id: string; lineId: string; lon: number; lat: number; kind: string; label: string }[];
  structureIndex: Map<string, number>;
  structureGrid: Map<number, number[]>;
  pair: TilePair | null;
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
function tileLon(x: number, z: number) {
  return (x / 2 ** z) * 360 - 180;
}
function tileLat(y: number, z: number) {
  const n = Math.PI - (2 * Math.PI * y) / 2 ** z;
  return (180 / Math.PI) * Math.atan(0.5 * (Math.exp(n) - Math.exp(-n)));
}

export interface TileStats {
  builds: number;
  hits: number;
  snapshotLoads: number;
}

type VtFeature = { type: 1 | 2; geometry: unknown; tags: Record<string, unknown> };

/** One per app: builds, caches and invalidates the span tiles of that app's database. */
export class SpanTileService {
  private version = 1;
  private snapshots = new Map<string, Promise<Snapshot>>();
  private cache = new Map<string, Buffer>();
  private cacheBytes = 0;
  /** The database's data version at the last sync: an unchanged version needs no fingerprint (its counts scan tables). */
  private seenVersion: string | null = null;
  private syncing: Promise<void> = Promise.resolve();
  private watcher: NodeJS.Timeout | null = null;
  private closed = false;
  private defaultPair: Promise<TilePair | null> | null = null;
  readonly stats: TileStats = { builds: 0, hits: 0, snapshotLoads: 0 };

  constructor(private readonly orm: MikroORM) {}

  /** Starts a new data version: every cached tile and snapshot is dropped. */
  invalidate() {
    this.version += 1;
    this.snapshots.clear();
    this.clearCache();
    this.seenVersion = null;
    this.defaultPair = null;
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
    this.syncing = this.syncing.then(() => this.sync()).catch((err) => console.error('span tile sync failed', err));
    return this.syncing;
  }

  private async sync() {
    if (this.closed || this.snapshots.size === 0) return;
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
      if (!ok) this.snapshots.delete(key);
    }
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

  /** The rows a snapshot is made of: all spans, or the given ones. */
  private async spanRows(em: EntityManager, pair: TilePair | null, ids?: string[]): Promise<any[]> {
    const withAssessment = pair && (await tableExists(em, 'assessments'));
    const params: unknown[] = withAssessment ? [pair!.harvesterProfileId, pair!.droneProfileId] : [];
    if (ids) params.push(...ids);
    return sql.all<any>(
      em,
      'select s.id, s.line_id, s.status, s.length_m, a.lon as lon0, a.lat as lat0, b.lon as lon1, b.lat as lat1' +
        (withAssessment ? ', x.score, x.harvest_w, x.perchable' : '') +
        ' from spans s join structures a on a.id = s.from_structure_id join structures b on b.id = s.to_structure_id' +
        (withAssessment ? ' left join assessments x on x.span_id = s.id and x.harvester_profile_id = ? and x.drone_profile_id = ?' : '') +
        (ids ? ` where s.id in (${marks(ids.length)})` : ''),
      params,
    );
  }

  /**
   * Watches the fingerprint in the background (never on a tile request), so changes made without a listener
   * (background rescoring, another process) also start a new data version within FINGERPRINT_EVERY_MS.
   */
  private ensureWatcher() {
    if (this.watcher || this.closed) return;
    this.watcher = setInterval(() => void this.syncNow(), FINGERPRINT_EVERY_MS);
    this.watcher.unref();
  }

  /** Stops the background watcher (the app is closing). */
  close() {
    this.closed = true;
    if (this.watcher) clearInterval(this.watcher);
    this.watcher = null;
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

  private loadSnapshot(pair: TilePair | null): Promise<Snapshot> {
    const key = pair ? `${pair.harvesterProfileId}|${pair.droneProfileId}` : '-';
    let p = this.snapshots.get(key);
    if (!p) {
      p = this.readSnapshot(pair);
      this.snapshots.set(key, p);
      p.catch(() => this.snapshots.delete(key));
    }
    return p;
  }

  private async readSnapshot(pair: TilePair | null): Promise<Snapshot> {
    this.stats.snapshotLoads += 1;
    const em = this.orm.em.fork();
    // The fingerprint is read first: anything written after it is picked up by the next sync.
    const fp = await this.readFingerprint(em);
    this.ensureWatcher();
    const rows = await this.spanRows(em, pair);
    const structures = await sql.all<any>(em, 'select id, line_id, lon, lat, kind, label from structures');
    const snap: Snapshot = {
      n: 0,
      ids: [],
      index: new Map(),
      lineIds: [],
      statuses: [],
      lon0: [],
      lat0: [],
      lon1: [],
      lat1: [],
      lengthM: [],
      score: [],
      harvestW: [],
      perchable: [],
      grid: new Map(),
      structures: [],
      structureIndex: new Map(),
      structureGrid: new Map(),
      pair,
      fp,
    };
    for (const r of rows) upsertSpan(snap, r);
    for (const t of structures) upsertStructure(snap, t);
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
    const key = `${resolved ? `${resolved.harvesterProfileId}|${resolved.droneProfileId}` : '-'}/${filterKey(filters)}/${z}/${x}/${y}`;
    const version = this.version;
    const hit = this.cache.get(key);
    if (hit) {
      this.stats.hits += 1;
      // Least recently used goes first: a hit moves to the end.
      this.cache.delete(key);
      this.cache.set(key, hit);
      return hit;
    }
    const snap = await this.loadSnapshot(resolved);
    const bytes = Buffer.from(buildTile(snap, z, x, y, filters));
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
}

function gridCellsOf(lonA: number, latA: number, lonB: number, latB: number): number[] {
  const keys: number[] = [];
  for (let x = gx(Math.min(lonA, lonB)); x <= gx(Math.max(lonA, lonB)); x++) for (let y = gy(Math.min(latA, latB)); y <= gy(Math.max(latA, latB)); y++) keys.push(gridKey(x, y));
  return keys;
}

function addToGrid(grid: Map<number, number[]>, keys: number[], i: number) {
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

/** Adds a span row to the snapshot, or replaces the entry of the same id (moving it on the grid if need be). */
function upsertSpan(snap: Snapshot, r: any) {
  let i = snap.index.get(r.id);
  if (i === undefined) {
    i = snap.n++;
    snap.index.set(r.id, i);
    snap.ids[i] = r.id;
  } else if (snap.lon0[i] !== r.lon0 || snap.lat0[i] !== r.lat0 || snap.lon1[i] !== r.lon1 || snap.lat1[i] !== r.lat1) {
    removeFromGrid(snap.grid, gridCellsOf(snap.lon0[i], snap.lat0[i], snap.lon1[i], snap.lat1[i]), i);
  } else {
    i = -1 - i; // same place: no grid change
  }
  const at = i < 0 ? -1 - i : i;
  snap.lineIds[at] = r.line_id;
  snap.statuses[at] = r.status;
  snap.lon0[at] = r.lon0;
  snap.lat0[at] = r.lat0;
  snap.lon1[at] = r.lon1;
  snap.lat1[at] = r.lat1;
  snap.lengthM[at] = r.length_m;
  snap.score[at] = r.score ?? NaN;
  snap.harvestW[at] = r.harvest_w ?? NaN;
  snap.perchable[at] = r.perchable === null || r.perchable === undefined ? -1 : r.perchable ? 1 : 0;
  if (i >= 0) addToGrid(snap.grid, gridCellsOf(r.lon0, r.lat0, r.lon1, r.lat1), at);
}

function upsertStructure(snap: Snapshot, t: any) {
  const entry = { id: t.id, lineId: t.line_id, lon: t.lon, lat: t.lat, kind: t.kind, label: t.label };
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

function buildTile(snap: Snapshot, z: number, x: number, y: number, filters: SpanMapFilters = {}): Uint8Array {
  const filtered = !!(filters.status || filters.lineId || filters.minHarvestW !== undefined || filters.minScore !== undefined);
  const scale = 2 ** z;
  const pad = TILE_BUFFER / TILE_EXTENT;
  const west = tileLon(x - pad, z);
  const east = tileLon(x + 1 + pad, z);
  const north = tileLat(y - pad, z);
  const south = tileLat(y + 1 + pad, z);
  const px = (lon: number) => Math.round((mercX(lon) * scale - x) * TILE_EXTENT);
  const py = (lat: number) => Math.round((mercY(lat) * scale - y) * TILE_EXTENT);

  const seen = new Set<number>();
  const candidates: number[] = [];
  const gx0 = gx(west);
  const gx1 = gx(east);
  const gy0 = gy(south);
  const gy1 = gy(north);
  const cells = (gx1 - gx0 + 1) * (gy1 - gy0 + 1);
  if (cells > snap.grid.size) {
    for (let i = 0; i < snap.n; i++) candidates.push(i);
  } else {
    for (let a = gx0; a <= gx1; a++) {
      for (let b = gy0; b <= gy1; b++) {
        const list = snap.grid.get(gridKey(a, b));
        if (!list) continue;
        for (const i of list) if (!seen.has(i)) (seen.add(i), candidates.push(i));
      }
    }
  }

  const spans: VtFeature[] = [];
  const general = z < FULL_DETAIL_ZOOM;
  const buckets = new Map<number, { feature: VtFeature; harvestW: number; score: number; count: number }>();
  const cellSize = z <= 10 ? GENERAL_CELL * 2 : GENERAL_CELL;
  for (const i of candidates) {
    const minLon = Math.min(snap.lon0[i], snap.lon1[i]);
    const maxLon = Math.max(snap.lon0[i], snap.lon1[i]);
    const minLat = Math.min(snap.lat0[i], snap.lat1[i]);
    const maxLat = Math.max(snap.lat0[i], snap.lat1[i]);
    if (maxLon < west || minLon > east || maxLat < south || minLat > north) continue;
    if (filtered && !passes(snap, i, filters)) continue;
    const x0 = px(snap.lon0[i]);
    const y0 = py(snap.lat0[i]);
    const x1 = px(snap.lon1[i]);
    const y1 = py(snap.lat1[i]);
    const tags: Record<string, unknown> = { id: snap.ids[i], lineId: snap.lineIds[i], status: snap.statuses[i], lengthM: Math.round(snap.lengthM[i] * 10) / 10 };
    const score = snap.score[i];
    const harvestW = snap.harvestW[i];
    if (!Number.isNaN(score)) tags.score = Math.round(score * 10) / 10;
    if (!Number.isNaN(harvestW)) tags.harvestW = Math.round(harvestW * 100) / 100;
    if (snap.perchable[i] >= 0) tags.perchable = snap.perchable[i] === 1;
    const feature: VtFeature = { type: 2, geometry: [[[x0, y0], [x1, y1]]], tags };
    if (!general) {
      spans.push(feature);
      continue;
    }
    // Generalised: per status and cell one representative span carrying the best harvest and score of its cell,
    // so the client's minimum-harvest / minimum-score filters keep every cell that has a qualifying span.
    // (A line filter is applied above, before this, when the tile URL carries it.)
    const cell = (STATUS_INDEX[snap.statuses[i]] ?? 7) * 1e8 + (Math.floor((x0 + x1) / 2 / cellSize) + 1000) * 1e4 + (Math.floor((y0 + y1) / 2 / cellSize) + 1000);
    const b = buckets.get(cell);
    const h = Number.isNaN(harvestW) ? -Infinity : harvestW;
    const s = Number.isNaN(score) ? -Infinity : score;
    if (!b) buckets.set(cell, { feature, harvestW: h, score: s, count: 1 });
    else {
      if (h > b.harvestW) b.feature = feature;
      b.harvestW = Math.max(b.harvestW, h);
      b.score = Math.max(b.score, s);
      b.count += 1;
    }
  }
  for (const b of buckets.values()) {
    const tags: Record<string, unknown> = { ...b.feature.tags, count: b.count };
    if (b.count > 1) {
      if (b.harvestW > -Infinity) tags.harvestW = Math.round(b.harvestW * 100) / 100;
      if (b.score > -Infinity) tags.score = Math.round(b.score * 10) / 10;
    }
    spans.push({ ...b.feature, tags });
  }

  const layers: Record<string, { features: VtFeature[] }> = { spans: { features: spans } };
  if (z >= STRUCTURE_MIN_ZOOM) {
    const structures: VtFeature[] = [];
    for (let a = gx0; a <= gx1; a++) {
      for (let b = gy0; b <= gy1; b++) {
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
