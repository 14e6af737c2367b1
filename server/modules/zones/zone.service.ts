import type { EntityManager } from '@mikro-orm/core';
import type { Feature, FeatureCollection, LineString, Polygon } from 'geojson';
import { booleanIntersects } from '@turf/turf';
import { Zone } from './zone.entity.ts';
import { usesPostgis } from '../../sql/postgis.ts';
import { sql } from '../../sql/query.ts';

/** UTC calendar date of an instant, YYYY-MM-DD (zones are valid for whole days). */
export function isoDay(at: Date): string {
  return at.toISOString().slice(0, 10);
}

/** Whether a zone applies on the day of `at` (validFrom and validTo both inclusive, null = open). */
export function isZoneActive(zone: Pick<Zone, 'validFrom' | 'validTo'>, at: Date = new Date()): boolean {
  const day = isoDay(at);
  if (zone.validFrom && day < zone.validFrom) return false;
  if (zone.validTo && day > zone.validTo) return false;
  return true;
}

/**
 * The zones active at `at` whose polygon touches or crosses the line (a span between its structures).
 * Used to block approval inside an exclude zone and by the assessment. With PostGIS the polygons are searched
 * on their GiST index (ST_Intersects); otherwise every zone is read and tested here (turf). Both test the
 * polygon and the line in plain longitude/latitude, so they give the same zones.
 */
export async function activeZonesForGeometry(
  em: EntityManager,
  lineString: LineString,
  at: Date = new Date(),
  opts: { severity?: Zone['severity'] } = {},
): Promise<Zone[]> {
  if (await usesPostgis(em)) {
    const rows = await sql.all<{ id: string }>(
      em,
      'select id from zones where ST_Intersects(geom, ST_SetSRID(ST_GeomFromGeoJSON(?::text), 4326))' + (opts.severity ? ' and severity = ?' : ''),
      opts.severity ? [JSON.stringify(lineString), opts.severity] : [JSON.stringify(lineString)],
    );
    if (!rows.length) return [];
    const zones = await em.find(Zone, { id: { $in: rows.map((r) => r.id) } }, { orderBy: { createdAt: 'asc', id: 'asc' } });
    return zones.filter((z) => isZoneActive(z, at));
  }
  return zonesTouching(await em.find(Zone, opts.severity ? { severity: opts.severity } : {}, { orderBy: { createdAt: 'asc', id: 'asc' } }), lineString, at);
}

/** The JavaScript rule on zones already read: active at `at` and touching or crossing the line. */
export function zonesTouching(zones: Zone[], lineString: LineString, at: Date = new Date()): Zone[] {
  return zones.filter((z) => isZoneActive(z, at) && booleanIntersects(z.geometry, lineString));
}

export function zoneToFeature(zone: Zone, at: Date = new Date()): Feature<Polygon> {
  return {
    type: 'Feature',
    id: zone.id,
    geometry: zone.geometry,
    properties: {
      id: zone.id,
      name: zone.name,
      reason: zone.reason,
      severity: zone.severity,
      validFrom: zone.validFrom,
      validTo: zone.validTo,
      active: isZoneActive(zone, at),
      version: zone.version,
      createdById: zone.createdById,
      createdAt: zone.createdAt.toISOString(),
      updatedAt: zone.updatedAt.toISOString(),
    },
  };
}

export function zonesToFeatureCollection(zones: Zone[], at: Date = new Date()): FeatureCollection<Polygon> {
  return { type: 'FeatureCollection', features: zones.map((z) => zoneToFeature(z, at)) };
}

/** The audited snapshot of a zone. */
export function zoneSnapshot(zone: Zone) {
  return {
    name: zone.name,
    reason: zone.reason,
    severity: zone.severity,
    geometry: zone.geometry,
    validFrom: zone.validFrom,
    validTo: zone.validTo,
    version: zone.version,
  };
}

export interface ZoneChange {
  action: 'create' | 'update' | 'delete';
  zoneId: string;
  /** The zone's polygons before and after the change (either may be null), for a rescoring of what they cover. */
  before: Polygon | null;
  after: Polygon | null;
}

export type ZoneListener = (em: EntityManager, change: ZoneChange) => void | Promise<void>;

const listeners = new Set<ZoneListener>();

/**
 * Subscribes to zone changes (after they are saved): the assessment rescoring and the span-tile cache use it.
 * Returns the unsubscribe function.
 */
export function registerZoneListener(fn: ZoneListener): () => void {
  listeners.add(fn);
  return () => listeners.delete(fn);
}

export async function notifyZoneChange(em: EntityManager, change: ZoneChange) {
  for (const fn of listeners) {
    try {
      await fn(em, change);
    } catch (err) {
      // A listener's failure must not undo a saved zone; it is logged for the operator.
      console.error('zone listener failed', err);
    }
  }
}
