// HTTP routes of line permissions (api.md "Line permissions"): admin and safety enter them, every role reads them.
import { pipeline } from 'node:stream/promises';
import type { RequestHandler } from 'express';
import multer from 'multer';
import { linePermissionCreateSchema } from '#shared/schemas/line-permissions.ts';
import type { AppContext } from '../../context.ts';
import { currentUser, featureRouter } from '../../http/access.ts';
import { AppError, parse } from '../../http/errors.ts';
import type { PhotoStorage } from '../photos/photo.storage.ts';
import { attachDocument, createPermission, lineOr404, listPermissions, permissionOr404, viewsOf } from './line-permissions.service.ts';

const ENTER = ['admin', 'safety'] as const;

/** One file in the field `document`; multer's errors in the shared shape (413 over the limit, 400 otherwise). */
function receiveDocument(maxBytes: number): RequestHandler {
  const upload = multer({
    storage: multer.memoryStorage(),
    defParamCharset: 'utf8',
    limits: { fileSize: maxBytes, files: 1, fields: 5, fieldSize: 1024, parts: 6 },
  }).single('document');
  const mb = Math.round((maxBytes / (1024 * 1024)) * 10) / 10;
  return (req, res, next) => {
    upload(req, res, (err: unknown) => {
      if (!err) return next();
      if (err instanceof multer.MulterError) {
        if (err.code === 'LIMIT_FILE_SIZE')
          return next(new AppError(413, 'payload_too_large', `document: the file is larger than ${mb} MB`, [{ path: 'document', message: `larger than ${mb} MB` }]));
        if (err.code === 'LIMIT_UNEXPECTED_FILE' || err.code === 'LIMIT_FILE_COUNT')
          return next(AppError.field('document', 'send one file, in the multipart field "document"'));
        return next(AppError.badRequest(`The upload form is not valid: ${err.message}`));
      }
      return next(AppError.badRequest('The upload could not be read (broken multipart body)'));
    });
  };
}

/** Mounted at /api/lines. */
export function linePermissionsRouter(ctx: AppContext, storage: PhotoStorage = ctx.storage) {
  const r = featureRouter('/api/lines');

  r.get('/:id/permissions', 'signed-in', async (req, res) => {
    const lineId = String(req.params.id);
    await lineOr404(req.em, lineId);
    res.json({ items: await viewsOf(req.em, await listPermissions(req.em, lineId)) });
  });

  r.post('/:id/permissions', ENTER, async (req, res) => {
    const input = parse(linePermissionCreateSchema, req.body);
    const p = await createPermission(req.em, currentUser(req).id, String(req.params.id), input);
    res.status(201).json((await viewsOf(req.em, [p]))[0]);
  });

  r.get('/:id/permissions/:pid', 'signed-in', async (req, res) => {
    const p = await permissionOr404(req.em, String(req.params.id), String(req.params.pid));
    res.json((await viewsOf(req.em, [p]))[0]);
  });

  r.post('/:id/permissions/:pid/document', ENTER, receiveDocument(ctx.config.maxUploadBytes), async (req, res) => {
    const p = await permissionOr404(req.em, String(req.params.id), String(req.params.pid));
    if (!req.file) throw AppError.field('document', 'attach the owner’s document (a PDF or an image) in the multipart field "document"');
    await attachDocument(req.em, storage, currentUser(req).id, p, req.file);
    res.json((await viewsOf(req.em, [p]))[0]);
  });

  r.get('/:id/permissions/:pid/document', 'signed-in', async (req, res) => {
    const p = await permissionOr404(req.em, String(req.params.id), String(req.params.pid));
    if (!p.documentKey) throw AppError.notFound('Document');
    const obj = await storage.get(p.documentKey);
    if (!obj) throw AppError.notFound('Document');
    res.set({
      'Content-Type': p.documentContentType ?? 'application/octet-stream',
      'Content-Length': String(obj.bytes),
      'X-Content-Type-Options': 'nosniff',
      // A document opens in the browser but runs nothing of its own.
      'Content-Security-Policy': 'sandbox',
      'Cache-Control': 'private, no-cache',
      'Content-Disposition': `inline; filename*=UTF-8''${encodeURIComponent(p.documentName ?? 'permission-document')}`,
    });
    try {
      await pipeline(obj.body, res);
    } catch {
      res.destroy();
    }
  });

  return r.router;
}
