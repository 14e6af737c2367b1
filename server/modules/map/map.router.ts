import fs from 'node:fs';
import path from 'node:path';
import express from 'express';
import type { AppContext } from '../../context.ts';
import { featureRouter } from '../../http/access.ts';
import { AppError } from '../../http/errors.ts';
import { z } from 'zod';
import type { EntityManager } from '@mikro-orm/core';
import { parse } from '../../http/errors.ts';
import { registerSpanListener } from '../inventory/inventory.service.ts';
import { registerZoneListener } from '../zones/zone.service.ts';
import { basemapExtent, buildStyle, MAP_ASSETS_DIR, FONT_FILES } from './style.ts';
import { SpanTileService } from './span-tiles.ts';
import { areaContents, areaQuery, basemapTile } from './offline-area.ts';

const services = new WeakMap<AppContext, SpanTileService>();

/** The span-tile service of one app (one database). */
export function spanTilesFor(ctx: AppContext): SpanTileService {
  let s = services.get(ctx);
  if (!s) {
    const service = new SpanTileService(ctx.orm);
    // Listeners are process-wide; only changes made through this app's database concern its tiles.
    const mine = (em: EntityManager) => em.getDriver() === ctx.orm.em.getDriver();
    // A saved span change is patched into the tiles before the response goes out, so the next tile shows it.
    const off = registerSpanListener(async (em) => {
      if (mine(em)) await service.syncNow();
    });
    // A zone change rescores the spans it covers in the background; the watcher picks the new scores up as they land.
    const offZone = registerZoneListener(async (em) => {
      if (mine(em)) await service.syncNow();
    });
    ctx.onClose(() => {
      off();
      offZone();
      service.close();
    });
    services.set(ctx, (s = service));
  }
  return s;
}

const tileParams = z.object({
  z: z.coerce.number({ error: 'z must be a whole number' }).int().min(0).max(22),
  x: z.coerce.number({ error: 'x must be a whole number' }).int().min(0),
  y: z.coerce.number({ error: 'y must be a whole number' }).int().min(0),
});
const optionalNumber = (field: string) =>
  z.preprocess((v) => (v === '' || v === undefined ? undefined : v), z.coerce.number({ error: `${field} must be a number` }).min(0, `${field} cannot be negative`).optional());
/** Filters of the span tiles and of the fit-to-results box (the spans table's parameter names). */
const boundsQuery = z.object({
  status: z.enum(['draft', 'submitted', 'approved', 'returned', 'suspended'], { error: 'Unknown status' }).optional(),
  lineId: z.string().max(64).optional(),
  minHarvestW: optionalNumber('minHarvestW'),
  minScore: optionalNumber('minScore'),
  harvesterProfileId: z.string().max(64).optional(),
  droneProfileId: z.string().max(64).optional(),
});

/** The request's own origin, for the absolute URLs the map worker needs. */
export function requestOrigin(req: express.Request): string {
  return `${req.protocol}://${req.get('host')}`;
}

/**
 * The map: style, basemap file, fonts and sprites (all served by the app itself, public like the client's
 * own assets) and the span tiles (signed-in).
 */
export function mapRouter(ctx: AppContext) {
  const r = featureRouter('');

  r.get('/map/style.json', 'public', (req, res) => {
    res.set('Cache-Control', 'no-cache').json(buildStyle(requestOrigin(req), basemapExtent(ctx.config.basemapPath)));
  });

  // The basemap file itself; the client's PMTiles reader fetches byte ranges of it.
  r.get('/map/basemap.pmtiles', 'public', (_req, res, next) => {
    if (!fs.existsSync(ctx.config.basemapPath)) return next(AppError.notFound('Basemap file'));
    res.sendFile(ctx.config.basemapPath, { acceptRanges: true, maxAge: '1h', headers: { 'Content-Type': 'application/octet-stream' } });
  });

  // One basemap tile out of that file, for maps and for areas taken offline (a cache keeps whole answers, not ranges).
  r.get('/map/basemap/:z/:x/:y.mvt', 'public', async (req, res) => {
    const { z: zoom, x, y } = parse(tileParams, req.params);
    const max = 2 ** zoom;
    if (x >= max) throw AppError.field('x', `x must be below ${max} at zoom ${zoom}`);
    if (y >= max) throw AppError.field('y', `y must be below ${max} at zoom ${zoom}`);
    const bytes = await basemapTile(ctx.config.basemapPath, zoom, x, y);
    if (!bytes) throw AppError.notFound('Basemap file');
    // Empty where the file holds no tile (an empty tile draws nothing).
    res.set({ 'Content-Type': 'application/vnd.mapbox-vector-tile', 'Cache-Control': 'public, max-age=3600' }).send(bytes);
  });

  r.get('/map/fonts/:file', 'public', (req, res, next) => {
    const file = FONT_FILES[String(req.params.file)];
    if (!file) return next(AppError.notFound('Font'));
    res.sendFile(file, { maxAge: '7d', headers: { 'Content-Type': 'font/woff2' } });
  });

  r.get('/map/sprites/:file', 'public', (req, res, next) => {
    const name = String(req.params.file);
    if (!/^sprite(@2x)?\.(png|json)$/.test(name)) return next(AppError.notFound('Sprite'));
    res.sendFile(path.join(MAP_ASSETS_DIR, 'sprites', name), { maxAge: '1h' });
  });

  // Spans (layer `spans`) and structures (layer `structures`) as Mapbox vector tiles, from the database.
  r.get('/api/tiles/spans/:z/:x/:y.mvt', 'signed-in', async (req, res) => {
    const { z: zoom, x, y } = parse(tileParams, req.params);
    const max = 2 ** zoom;
    if (x >= max) throw AppError.field('x', `x must be below ${max} at zoom ${zoom}`);
    if (y >= max) throw AppError.field('y', `y must be below ${max} at zoom ${zoom}`);
    const { harvesterProfileId, droneProfileId, ...filters } = parse(boundsQuery, req.query);
    const bytes = await spanTilesFor(ctx).tile(zoom, x, y, { harvesterProfileId, droneProfileId }, filters);
    res.set('Content-Type', 'application/vnd.mapbox-vector-tile');
    // Revalidated on every use (the ETag answers 304 while nothing changed): an edit shows at once.
    res.set('Cache-Control', 'private, no-cache');
    res.send(bytes);
  });

  // What lies in a framed box, for taking that area offline: its spans, their lines, photos; how many structures.
  r.get('/api/map/area', 'signed-in', async (req, res) => {
    const { bbox } = parse(areaQuery, req.query);
    res.json(await areaContents(req.em, bbox));
  });

  // The box around the spans that pass the map's filters, for "fit to results".
  r.get('/api/map/span-bounds', 'signed-in', async (req, res) => {
    const q = parse(boundsQuery, req.query);
    const { harvesterProfileId, droneProfileId, ...filters } = q;
    res.json(await spanTilesFor(ctx).bounds(filters, { harvesterProfileId, droneProfileId }));
  });

  return r.router;
}
