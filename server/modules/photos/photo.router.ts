import { pipeline } from 'node:stream/promises';
import type { RequestHandler } from 'express';
import multer from 'multer';
import { rateLimit } from 'express-rate-limit';
import { sharedRateLimitStore } from '../../http/rate-limit-store.ts';
import { z } from 'zod';
import type { AppContext } from '../../context.ts';
import { currentUser, hasRole, featureRouter } from '../../http/access.ts';
import { AppError, errorBody, parse } from '../../http/errors.ts';
import { audit } from '../audit/audit.service.ts';
import { Span } from '../inventory/span.entity.ts';
import { Hazard } from '../inventory/hazard.entity.ts';
import { Photo } from './photo.entity.ts';
import type { PhotoStorage } from './photo.storage.ts';
import { processPhoto, type ProcessedPhoto } from './photo.pipeline.ts';
import { deletePhoto, snapshot, storePhotos, suggestSpans, sweepOrphans, toApi, variantKey, type PhotoVariant } from './photo.service.ts';
import type { EntityManager } from '@mikro-orm/core';

/** Most files one request may carry in the `photos` field. */
export const MAX_FILES_PER_REQUEST = 8;
/** Served files never change under an id, so browsers may keep them a day (private: never in shared caches). */
const FILE_CACHE = 'private, max-age=86400';

const optionalId = z.preprocess((v) => (v === '' ? undefined : v), z.string().trim().min(1).max(64).optional());
const uploadFields = z.object({ spanId: optionalId, hazardId: optionalId });

const nullableId = z.union([z.string().trim().min(1).max(64), z.null()]).optional();
const patchBody = z
  .object({
    spanId: nullableId,
    hazardId: nullableId,
    lat: z.union([z.number().min(-90).max(90), z.null()]).optional(),
    lon: z.union([z.number().min(-180).max(180), z.null()]).optional(),
  })
  .strict()
  .refine((b) => (b.lat === undefined) === (b.lon === undefined) && (b.lat === null) === (b.lon === null), {
    message: 'give lat and lon together',
    path: ['lon'],
  });

const listQuery = z.object({ spanId: optionalId, hazardId: optionalId, unplaced: z.enum(['true', 'false']).optional() });
const geojsonQuery = z.object({
  spanId: optionalId,
  bbox: z
    .string()
    .regex(/^-?\d+(\.\d+)?(,-?\d+(\.\d+)?){3}$/, 'minLon,minLat,maxLon,maxLat')
    .optional(),
});

const VARIANTS: Record<string, PhotoVariant> = { thumbnail: 'thumbnail', display: 'display', original: 'original' };
const EXT: Record<string, string> = { 'image/jpeg': 'jpg', 'image/png': 'png', 'image/webp': 'webp', 'image/avif': 'avif' };

/** multer's and busboy's errors in the shared error shape: 413 for a file over the limit, else 400. */
function receiveFiles(maxBytes: number): RequestHandler {
  const upload = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: maxBytes, files: MAX_FILES_PER_REQUEST, fields: 10, fieldSize: 4096, parts: MAX_FILES_PER_REQUEST + 10 },
  }).fields([
    { name: 'photo', maxCount: 1 },
    { name: 'photos', maxCount: MAX_FILES_PER_REQUEST },
  ]);
  const mb = Math.round((maxBytes / (1024 * 1024)) * 10) / 10;
  return (req, res, next) => {
    upload(req, res, (err: unknown) => {
      if (!err) return next();
      if (err instanceof multer.MulterError) {
        const field = err.field ?? 'photo';
        switch (err.code) {
          case 'LIMIT_FILE_SIZE':
            return next(new AppError(413, 'payload_too_large', `${field}: the file is larger than ${mb} MB`, [{ path: field, message: `larger than ${mb} MB` }]));
          case 'LIMIT_FILE_COUNT':
          case 'LIMIT_PART_COUNT':
            return next(new AppError(413, 'payload_too_large', `At most ${MAX_FILES_PER_REQUEST} photos per upload`));
          case 'LIMIT_UNEXPECTED_FILE':
            return next(AppError.field(field, 'unexpected file field; send the image as "photo" (or several as "photos")'));
          default:
            return next(AppError.badRequest(`The upload form is not valid: ${err.message}`));
        }
      }
      return next(AppError.badRequest('The upload could not be read (broken multipart body)'));
    });
  };
}

async function checkLinks(em: EntityManager, spanId: string | null | undefined, hazardId: string | null | undefined) {
  let span = spanId;
  if (hazardId) {
    const hazard = await em.findOne(Hazard, { id: hazardId });
    if (!hazard) throw AppError.field('hazardId', 'no hazard with this id');
    if (span && span !== hazard.spanId) throw AppError.field('hazardId', 'this hazard belongs to another span');
    span = hazard.spanId;
  }
  if (span && !(await em.findOne(Span, { id: span }, { fields: ['id'] }))) throw AppError.field('spanId', 'no span with this id');
  return span;
}

async function withSuggestions(em: EntityManager, p: Photo) {
  const suggestions = p.lat !== null && p.lon !== null ? await suggestSpans(em, p.lat, p.lon) : [];
  return { ...toApi(p), suggestedSpanIds: suggestions.map((s) => s.spanId), suggestions };
}

export function photosRouter(ctx: AppContext, storage: PhotoStorage = ctx.storage) {
  const r = featureRouter('/api/photos');

  // Once after start-up: remove files a crash left without a photo row (older than an hour).
  let sweeping: Promise<unknown> | null = null;
  const timer = setTimeout(() => {
    sweeping = sweepOrphans(ctx.orm.em.fork(), storage).then(
      (removed) => removed.length && console.log(`photos: removed ${removed.length} orphaned file(s)`),
      (err) => console.error('photos: orphan sweep failed', err),
    );
  }, 15_000);
  timer.unref();
  ctx.onClose(async () => {
    clearTimeout(timer);
    await sweeping;
  });

  const load = async (em: EntityManager, id: string) => {
    const photo = await em.findOne(Photo, { id });
    if (!photo) throw AppError.notFound('Photo');
    return photo;
  };

  // Surveyors photograph spans; safety officers may add evidence of a hazard. One file as `photo`, or several as `photos`.
  // Per signed-in user, not per address: a crew shares one uplink. Checked before the file is read.
  const uploadLimiter = rateLimit({
    windowMs: ctx.config.uploadWindowMs,
    limit: ctx.config.uploadBurst,
    keyGenerator: (req) => currentUser(req).id,
    // Counted in the database: a user's uploads through every process count together.
    store: sharedRateLimitStore(ctx, 'photo-upload'),
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: (_req, res) => {
      res.status(429).json(errorBody('too_many_requests', 'Too many photo uploads in a short time; wait a few minutes and send the rest again'));
    },
  });
  r.post('/', ['surveyor', 'safety'], uploadLimiter, receiveFiles(ctx.config.maxUploadBytes), async (req, res) => {
    const user = currentUser(req);
    const files = (req.files ?? {}) as Record<string, Express.Multer.File[] | undefined>;
    const several = files.photos ?? [];
    const list = [...(files.photo ?? []).map((f) => ({ f, label: 'photo' })), ...several.map((f, i) => ({ f, label: `photos.${i}` }))];
    if (!list.length) throw AppError.field('photo', 'attach an image file (multipart field "photo")');
    const fields = parse(uploadFields, req.body);
    const spanId = (await checkLinks(req.em, fields.spanId, fields.hazardId)) ?? null;
    // Everything is checked and converted in memory first: a bad file fails the request before any byte is written.
    const processed: ProcessedPhoto[] = [];
    for (const { f, label } of list) processed.push(await processPhoto(f.buffer, label));
    const photos = await storePhotos(req.em, storage, processed, { uploaderId: user.id, spanId, hazardId: fields.hazardId ?? null });
    const out = await Promise.all(photos.map((p) => withSuggestions(req.em, p)));
    res.status(201).json(several.length ? { items: out } : out[0]);
  });

  r.get('/', 'signed-in', async (req, res) => {
    const q = parse(listQuery, req.query);
    const where: Record<string, unknown> = {};
    if (q.spanId) where.spanId = q.spanId;
    if (q.hazardId) where.hazardId = q.hazardId;
    if (q.unplaced === 'true') where.lat = null;
    const photos = await req.em.find(Photo, where, { orderBy: { createdAt: 'asc', id: 'asc' }, limit: 1000 });
    res.json({ items: photos.map(toApi) });
  });

  // Points for the map's photo layer.
  r.get('/geojson', 'signed-in', async (req, res) => {
    const q = parse(geojsonQuery, req.query);
    const where: Record<string, unknown> = { lat: { $ne: null }, lon: { $ne: null } };
    if (q.spanId) where.spanId = q.spanId;
    if (q.bbox) {
      const [minLon, minLat, maxLon, maxLat] = q.bbox.split(',').map(Number);
      where.lat = { $gte: minLat, $lte: maxLat };
      where.lon = { $gte: minLon, $lte: maxLon };
    }
    const photos = await req.em.find(Photo, where, { orderBy: { createdAt: 'asc', id: 'asc' }, limit: 10_000 });
    res.json({
      type: 'FeatureCollection',
      features: photos.map((p) => ({
        type: 'Feature',
        id: p.id,
        geometry: { type: 'Point', coordinates: [p.lon, p.lat] },
        properties: {
          id: p.id,
          spanId: p.spanId,
          hazardId: p.hazardId,
          bearingDeg: p.bearingDeg,
          takenAt: p.takenAt,
          positionSource: p.positionSource,
          thumbnailUrl: `/api/photos/${p.id}/thumbnail`,
        },
      })),
    });
  });

  r.get('/:id', 'signed-in', async (req, res) => {
    res.json(await withSuggestions(req.em, await load(req.em, String(req.params.id))));
  });

  // The surveyor confirms the span (or hazard) link, or places a photo without GPS by hand.
  r.patch('/:id', ['surveyor', 'safety'], async (req, res) => {
    const user = currentUser(req);
    const body = parse(patchBody, req.body);
    const photo = await load(req.em, String(req.params.id));
    const before = snapshot(photo);
    if (body.spanId !== undefined || body.hazardId !== undefined) {
      const spanId = body.spanId !== undefined ? body.spanId : photo.spanId;
      let hazardId = body.hazardId !== undefined ? body.hazardId : photo.hazardId;
      // Moving a photo to another span drops a hazard link that belongs to the old one.
      if (body.hazardId === undefined && hazardId && (await req.em.findOne(Hazard, { id: hazardId }))?.spanId !== spanId) hazardId = null;
      photo.spanId = (await checkLinks(req.em, spanId, hazardId)) ?? null;
      photo.hazardId = hazardId ?? null;
    }
    if (body.lat !== undefined && body.lon !== undefined) {
      photo.lat = body.lat;
      photo.lon = body.lon;
      photo.positionSource = body.lat === null ? null : 'manual';
    }
    audit(req.em, { actorId: user.id, action: 'photo.update', recordType: 'photo', recordId: photo.id, before, after: snapshot(photo) });
    await req.em.flush();
    res.json(await withSuggestions(req.em, photo));
  });

  r.delete('/:id', 'signed-in', async (req, res) => {
    const user = currentUser(req);
    const photo = await load(req.em, String(req.params.id));
    if (photo.uploaderId !== user.id && !hasRole(user, 'admin')) throw AppError.forbidden('Only the uploader or an admin may delete a photo');
    await deletePhoto(req.em, storage, photo, user.id);
    res.status(204).end();
  });

  // The files: any signed-in role may view them.
  r.get('/:id/:variant', 'signed-in', async (req, res) => {
    const variant = VARIANTS[String(req.params.variant)];
    if (!variant) throw AppError.notFound('Photo file');
    const photo = await load(req.em, String(req.params.id));
    const etag = `"${photo.id}.${variant}"`;
    const inm = req.get('if-none-match');
    if (inm && inm.split(',').some((t) => t.trim().replace(/^W\//, '') === etag)) {
      res.set({ ETag: etag, 'Cache-Control': FILE_CACHE }).status(304).end();
      return;
    }
    const obj = await storage.get(variantKey(photo, variant));
    if (!obj) throw AppError.notFound('Photo file');
    const type = variant === 'original' ? photo.contentType : 'image/jpeg';
    res.set({
      'Content-Type': type,
      'Content-Length': String(obj.bytes),
      'X-Content-Type-Options': 'nosniff',
      'Cache-Control': FILE_CACHE,
      ETag: etag,
      'Content-Disposition': `inline; filename="photo-${photo.id}-${variant}.${EXT[type] ?? 'bin'}"`,
    });
    if (req.method === 'HEAD') {
      obj.body.destroy();
      res.end();
      return;
    }
    try {
      await pipeline(obj.body, res);
    } catch {
      res.destroy();
    }
  });

  return r.router;
}
