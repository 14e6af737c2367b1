import fs from 'node:fs';
import path from 'node:path';
import express from 'express';
import type { AppContext } from '../../context.ts';
import { featureRouter } from '../../http/access.ts';
import { AppError } from '../../http/errors.ts';
import { buildStyle, MAP_ASSETS_DIR, FONT_FILES } from './style.ts';

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
    res.set('Cache-Control', 'no-cache').json(buildStyle(requestOrigin(req)));
  });

  // The basemap file itself; the client's PMTiles reader fetches byte ranges of it.
  r.get('/map/basemap.pmtiles', 'public', (_req, res, next) => {
    if (!fs.existsSync(ctx.config.basemapPath)) return next(AppError.notFound('Basemap file'));
    res.sendFile(ctx.config.basemapPath, { acceptRanges: true, maxAge: '1h', headers: { 'Content-Type': 'application/octet-stream' } });
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

  return r.router;
}
