// Line permissions: create, list, attach the owner's document, and the check a mission's authorisation makes.
import crypto from 'node:crypto';
import sharp from 'sharp';
import { UniqueConstraintViolationException, type EntityManager } from '@mikro-orm/core';
import { permissionCovers, type LinePermissionView, linePermissionCreateSchema } from '#shared/schemas/line-permissions.ts';
import type { z } from 'zod';
import { AppError } from '../../http/errors.ts';
import { audit } from '../audit/audit.service.ts';
import { User } from '../auth/user.entity.ts';
import { Line } from '../inventory/line.entity.ts';
import { newId } from '../inventory/inventory.service.ts';
import type { PhotoStorage } from '../photos/photo.storage.ts';
import { LinePermission } from './line-permission.entity.ts';

/** Today's calendar day in UTC, as the server counts whole days. */
export const todayUtc = (now = new Date()) => now.toISOString().slice(0, 10);

export function permissionSnapshot(p: LinePermission) {
  return {
    lineId: p.lineId,
    reference: p.reference,
    validFrom: p.validFrom,
    validTo: p.validTo,
    conditions: p.conditions,
    documentName: p.documentName,
    documentContentType: p.documentContentType,
    documentBytes: p.documentBytes,
  };
}

export function permissionView(p: LinePermission, createdByName: string | null, today = todayUtc()): LinePermissionView {
  return {
    id: p.id,
    lineId: p.lineId,
    reference: p.reference,
    validFrom: p.validFrom,
    validTo: p.validTo,
    conditions: p.conditions,
    expired: p.validTo < today,
    notYetValid: p.validFrom > today,
    documentUrl: p.documentKey ? `/api/lines/${encodeURIComponent(p.lineId)}/permissions/${encodeURIComponent(p.id)}/document` : null,
    documentName: p.documentName,
    documentContentType: p.documentContentType,
    documentBytes: p.documentBytes,
    createdAt: p.createdAt.toISOString(),
    createdById: p.createdById,
    createdByName,
  };
}

async function namesOf(em: EntityManager, ids: string[]) {
  const unique = [...new Set(ids)];
  const users = unique.length ? await em.find(User, { id: { $in: unique } }, { fields: ['id', 'name'] }) : [];
  return new Map(users.map((u) => [u.id, u.name]));
}

export async function viewsOf(em: EntityManager, items: LinePermission[]) {
  const names = await namesOf(em, items.map((p) => p.createdById));
  const today = todayUtc();
  return items.map((p) => permissionView(p, names.get(p.createdById) ?? null, today));
}

export async function lineOr404(em: EntityManager, lineId: string) {
  const line = await em.findOne(Line, { id: lineId });
  if (!line) throw AppError.notFound('Line');
  return line;
}

export async function permissionOr404(em: EntityManager, lineId: string, permissionId: string) {
  const p = await em.findOne(LinePermission, { id: permissionId, lineId });
  if (!p) throw AppError.notFound('Permission');
  return p;
}

/** The permissions of a line, the latest-ending first. */
export async function listPermissions(em: EntityManager, lineId: string) {
  return em.find(LinePermission, { lineId }, { orderBy: { validTo: 'desc', validFrom: 'desc', reference: 'asc' } });
}

export async function createPermission(em: EntityManager, actorId: string, lineId: string, input: z.output<typeof linePermissionCreateSchema>) {
  await lineOr404(em, lineId);
  const duplicate = () =>
    AppError.conflict(`This line already has a permission with the reference “${input.reference}”; open it instead of entering it twice.`, [
      { path: 'reference', message: 'this line already has a permission with this reference' },
    ]);
  if (await em.findOne(LinePermission, { lineId, reference: input.reference }, { fields: ['id'] })) throw duplicate();
  const now = new Date();
  const p = em.create(LinePermission, { id: newId(), lineId, ...input, createdById: actorId, version: 1, createdAt: now, updatedAt: now });
  audit(em, { actorId, action: 'line-permission.create', recordType: 'line-permission', recordId: p.id, before: null, after: permissionSnapshot(p) });
  try {
    await em.flush();
  } catch (err) {
    // Two entries of the same reference at the same moment: the unique index lets one through.
    if (err instanceof UniqueConstraintViolationException) {
      em.clear();
      throw duplicate();
    }
    throw err;
  }
  return p;
}

export const DOCUMENT_TYPES_TEXT = 'a PDF, JPEG, PNG or WebP file';
const EXT: Record<string, string> = { 'application/pdf': 'pdf', 'image/jpeg': 'jpg', 'image/png': 'png', 'image/webp': 'webp' };

/** What a document is, judged from its content (never its name): a PDF by its header and end marker, an image by decoding it. */
export async function identifyDocument(buf: Buffer): Promise<string> {
  if (buf.length >= 5 && buf.toString('latin1', 0, 5) === '%PDF-') {
    // A PDF ends with %%EOF (ISO 32000-1 §7.5.5), give or take trailing white space; a cut-off upload does not.
    if (!buf.toString('latin1', Math.max(0, buf.length - 1024)).includes('%%EOF'))
      throw AppError.field('document', 'the PDF is truncated or damaged (no end-of-file marker)');
    return 'application/pdf';
  }
  let format: string | undefined;
  try {
    const meta = await sharp(buf, { limitInputPixels: false }).metadata();
    if (!meta.width || !meta.height) throw new Error('no size');
    format = meta.format;
  } catch {
    throw new AppError(415, 'unsupported_media_type', `This file is not a supported document; attach ${DOCUMENT_TYPES_TEXT}`, [
      { path: 'document', message: `not ${DOCUMENT_TYPES_TEXT}` },
    ]);
  }
  const type = format === 'jpeg' ? 'image/jpeg' : format === 'png' ? 'image/png' : format === 'webp' ? 'image/webp' : null;
  if (!type)
    throw new AppError(415, 'unsupported_media_type', `${String(format).toUpperCase()} is not a supported document; attach ${DOCUMENT_TYPES_TEXT}`, [
      { path: 'document', message: `not ${DOCUMENT_TYPES_TEXT}` },
    ]);
  return type;
}

/** A file name safe to show and to send back in Content-Disposition (the client's name, cleaned). */
function cleanName(name: string, ext: string) {
  const base = name.normalize('NFC').replace(/[\u0000-\u001f\u007f"\\/]/g, '').trim().slice(0, 120);
  return base || `permission-document.${ext}`;
}

/** Attaches (or replaces) the permission's document; the file is stored before the row names it, the old file removed after. */
export async function attachDocument(em: EntityManager, storage: PhotoStorage, actorId: string, p: LinePermission, file: { buffer: Buffer; originalname: string }) {
  const contentType = await identifyDocument(file.buffer);
  const ext = EXT[contentType]!;
  const key = `documents/${p.id.toLowerCase()}-${crypto.randomBytes(6).toString('hex')}.${ext}`;
  await storage.put(key, file.buffer, contentType);
  const before = permissionSnapshot(p);
  const oldKey = p.documentKey;
  p.documentKey = key;
  p.documentName = cleanName(file.originalname, ext);
  p.documentContentType = contentType;
  p.documentBytes = file.buffer.length;
  p.updatedAt = new Date();
  audit(em, { actorId, action: 'line-permission.document', recordType: 'line-permission', recordId: p.id, before, after: permissionSnapshot(p) });
  try {
    await em.flush();
  } catch (err) {
    await storage.delete(key).catch(() => undefined);
    throw err;
  }
  if (oldKey) await storage.delete(oldKey).catch(() => undefined);
  return p;
}

/**
 * For a mission's authorisation: of these lines, the ones with no permission covering `date` (YYYY-MM-DD),
 * each with the line's name, in the order given.
 */
export async function linesLackingPermission(em: EntityManager, lineIds: string[], date: string): Promise<{ lineId: string; lineName: string }[]> {
  const unique = [...new Set(lineIds)];
  if (!unique.length) return [];
  const [perms, lines] = await Promise.all([
    em.find(LinePermission, { lineId: { $in: unique }, validFrom: { $lte: date }, validTo: { $gte: date } }, { fields: ['lineId', 'validFrom', 'validTo'] }),
    em.find(Line, { id: { $in: unique } }, { fields: ['id', 'name'] }),
  ]);
  const covered = new Set(perms.filter((p) => permissionCovers(p, date)).map((p) => p.lineId));
  const names = new Map(lines.map((l) => [l.id, l.name]));
  return unique.filter((id) => !covered.has(id)).map((lineId) => ({ lineId, lineName: names.get(lineId) ?? lineId }));
}

/** Every permission of these lines, by line, for a mission's brief. */
export async function permissionsForLines(em: EntityManager, lineIds: string[]) {
  const unique = [...new Set(lineIds)];
  const items = unique.length ? await em.find(LinePermission, { lineId: { $in: unique } }, { orderBy: { validTo: 'desc', reference: 'asc' } }) : [];
  return viewsOf(em, items);
}
