// Pure photo pipeline: bytes in → what the file is, where and when it was taken, and its derivatives.
// No database, no storage: the router and the bench both call it.
import sharp from 'sharp';
import exifr from 'exifr';
import { AppError } from '../../http/errors.ts';
import type { PhotoContentType } from './photo.entity.ts';

export const ACCEPTED_TYPES_TEXT = 'JPEG, PNG, WebP or AVIF';
/** sharp's own default input limit (0x3FFF × 0x3FFF ≈ 268 megapixels); larger images are refused before decoding. */
export const MAX_INPUT_PIXELS = 0x3fff * 0x3fff;
export const THUMBNAIL_PX = 320;
export const DISPLAY_PX = 1600;

export interface PhotoExif {
  lat: number | null;
  lon: number | null;
  altitudeM: number | null;
  bearingDeg: number | null;
  bearingRef: string | null;
  takenAt: string | null;
  takenAtHasOffset: boolean;
}

export interface ProcessedPhoto extends PhotoExif {
  contentType: PhotoContentType;
  /** Upright size of the original, after EXIF orientation. */
  width: number;
  height: number;
  bytes: number;
  original: Buffer;
  display: Buffer;
  thumbnail: Buffer;
}

type Magic = PhotoContentType | null;

/** What the first bytes claim, only to tell a damaged accepted file (400) from another kind of file (415). */
function sniff(buf: Buffer): Magic {
  if (buf.length >= 3 && buf[0] === 0xff && buf[1] === 0xd8 && buf[2] === 0xff) return 'image/jpeg';
  if (buf.length >= 8 && buf.subarray(0, 8).equals(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]))) return 'image/png';
  if (buf.length >= 12 && buf.toString('latin1', 0, 4) === 'RIFF' && buf.toString('latin1', 8, 12) === 'WEBP') return 'image/webp';
  if (buf.length >= 12 && buf.toString('latin1', 4, 8) === 'ftyp' && /^avi[fs]$/.test(buf.toString('latin1', 8, 12))) return 'image/avif';
  return null;
}

const unsupported = (what: string) =>
  new AppError(415, 'unsupported_media_type', `${what} is not a supported image; upload ${ACCEPTED_TYPES_TEXT}`);
const corrupt = (label: string) => AppError.field(label, 'the image is truncated or damaged and cannot be read');

/** Judges the type from the content with sharp; throws 415 / 400 / 413 AppErrors. */
async function identify(buf: Buffer, label: string) {
  const magic = sniff(buf);
  let meta: Awaited<ReturnType<ReturnType<typeof sharp>['metadata']>>;
  try {
    meta = await sharp(buf, { limitInputPixels: false }).metadata();
  } catch {
    if (magic) throw corrupt(label);
    throw unsupported('This file');
  }
  let contentType: PhotoContentType;
  switch (meta.format) {
    case 'jpeg':
      contentType = 'image/jpeg';
      break;
    case 'png':
      contentType = 'image/png';
      break;
    case 'webp':
      contentType = 'image/webp';
      break;
    case 'heif':
      // sharp reads AVIF (AV1 in a HEIF box); HEIC (HEVC) does not decode here.
      if (meta.compression !== 'av1') throw unsupported('HEIC');
      contentType = 'image/avif';
      break;
    case 'svg':
      throw unsupported('SVG');
    default:
      throw unsupported(meta.format ? meta.format.toUpperCase() : 'This file');
  }
  const w = meta.width ?? 0;
  const h = meta.height ?? 0;
  if (!w || !h) throw corrupt(label);
  if (w * h > MAX_INPUT_PIXELS) {
    throw new AppError(
      413,
      'payload_too_large',
      `${label}: the image is ${w} × ${h} pixels, more than the ${Math.floor(MAX_INPUT_PIXELS / 1e6)}-megapixel limit`,
      [{ path: label, message: 'too many pixels' }],
    );
  }
  const swap = (meta.orientation ?? 1) >= 5;
  return { meta, contentType, width: swap ? h : w, height: swap ? w : h };
}

const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

function dms(v: unknown): number | null {
  if (typeof v === 'number') return num(v);
  if (Array.isArray(v) && v.length > 0 && v.every((x) => typeof x === 'number' && Number.isFinite(x))) {
    const [d, m = 0, s = 0] = v as number[];
    return d + m / 60 + s / 3600;
  }
  return null;
}

function ref(v: unknown): string | null {
  if (typeof v === 'string') return v.trim().toUpperCase().slice(0, 1) || null;
  if (v instanceof Uint8Array || Array.isArray(v)) return v.length ? String(v[0]) : null;
  if (typeof v === 'number') return String(v);
  return null;
}

/** "2026:05:04 10:11:12" + "+09:30" → "2026-05-04T10:11:12+09:30"; without an offset the local time alone. */
export function exifTime(raw: unknown, offset: unknown): { takenAt: string | null; takenAtHasOffset: boolean } {
  if (typeof raw !== 'string') return { takenAt: null, takenAtHasOffset: false };
  const m = /^(\d{4})[:-](\d{2})[:-](\d{2})[ T](\d{2}):(\d{2}):(\d{2})(\.\d+)?/.exec(raw.trim());
  if (!m || m[1] === '0000') return { takenAt: null, takenAtHasOffset: false };
  const local = `${m[1]}-${m[2]}-${m[3]}T${m[4]}:${m[5]}:${m[6]}`;
  const off = typeof offset === 'string' ? offset.trim() : '';
  if (/^[+-]\d{2}:\d{2}$/.test(off)) return { takenAt: local + off, takenAtHasOffset: true };
  if (off === 'Z') return { takenAt: `${local}Z`, takenAtHasOffset: true };
  return { takenAt: local, takenAtHasOffset: false };
}

/** Reads GPS and capture time from the raw EXIF block (as sharp hands it out: works for JPEG, PNG, WebP and AVIF alike). */
export async function readExif(exifBlock: Buffer | undefined): Promise<PhotoExif> {
  const none: PhotoExif = { lat: null, lon: null, altitudeM: null, bearingDeg: null, bearingRef: null, takenAt: null, takenAtHasOffset: false };
  if (!exifBlock || exifBlock.length < 8) return none;
  // sharp gives "Exif\0\0" + TIFF header; exifr reads the TIFF structure directly.
  const tiff = exifBlock.toString('latin1', 0, 4) === 'Exif' ? exifBlock.subarray(6) : exifBlock;
  let tags: Record<string, unknown> | undefined;
  try {
    // reviveValues: false keeps the date as written, so the server's time zone never enters it.
    tags = await exifr.parse(tiff, { tiff: true, exif: true, gps: true, interop: false, ifd1: false, reviveValues: false, translateValues: false, translateKeys: true, mergeOutput: true });
  } catch {
    return none;
  }
  if (!tags) return none;
  const out = { ...none };

  const latAbs = dms(tags.GPSLatitude);
  const lonAbs = dms(tags.GPSLongitude);
  const latRef = ref(tags.GPSLatitudeRef);
  const lonRef = ref(tags.GPSLongitudeRef);
  if (latAbs !== null && lonAbs !== null) {
    const lat = latRef === 'S' ? -Math.abs(latAbs) : latAbs;
    const lon = lonRef === 'W' ? -Math.abs(lonAbs) : lonAbs;
    if (Math.abs(lat) <= 90 && Math.abs(lon) <= 180) {
      out.lat = lat;
      out.lon = lon;
    }
  }
  const alt = num(tags.GPSAltitude);
  if (alt !== null) out.altitudeM = ref(tags.GPSAltitudeRef) === '1' ? -Math.abs(alt) : alt;
  const bearing = num(tags.GPSImgDirection);
  if (bearing !== null) {
    out.bearingDeg = ((bearing % 360) + 360) % 360;
    const r = ref(tags.GPSImgDirectionRef);
    out.bearingRef = r === 'T' || r === 'M' ? r : null;
  }
  const time =
    tags.DateTimeOriginal !== undefined
      ? exifTime(tags.DateTimeOriginal, tags.OffsetTimeOriginal)
      : tags.CreateDate !== undefined
        ? exifTime(tags.CreateDate, tags.OffsetTimeDigitized)
        : exifTime(tags.ModifyDate, tags.OffsetTime);
  out.takenAt = time.takenAt;
  out.takenAtHasOffset = time.takenAtHasOffset;
  return out;
}

/** Upright (EXIF orientation applied), metadata stripped (sharp's default), sRGB JPEG inside a size × size box. */
function derivative(input: Buffer, size: number, fromOriginal: boolean, hasAlpha: boolean) {
  let img = sharp(input, { limitInputPixels: MAX_INPUT_PIXELS, failOn: 'warning' });
  if (fromOriginal) img = img.rotate();
  img = img.resize({ width: size, height: size, fit: 'inside', withoutEnlargement: true });
  // Transparent PNG/WebP/AVIF areas become white rather than JPEG's black.
  if (hasAlpha) img = img.flatten({ background: '#ffffff' });
  return img.jpeg({ quality: fromOriginal ? 82 : 78 }).toBuffer();
}

/** The whole pipeline for one file; `label` names the form field in error messages. */
export async function processPhoto(buf: Buffer, label = 'photo'): Promise<ProcessedPhoto> {
  if (!buf.length) throw AppError.field(label, 'the file is empty');
  const { meta, contentType, width, height } = await identify(buf, label);
  let display: Buffer;
  let thumbnail: Buffer;
  try {
    display = await derivative(buf, DISPLAY_PX, true, !!meta.hasAlpha);
    // The thumbnail comes from the (already upright, opaque) display image: a far smaller decode than the original.
    thumbnail = await derivative(display, THUMBNAIL_PX, false, false);
  } catch {
    throw corrupt(label);
  }
  const exif = await readExif(meta.exif);
  return { ...exif, contentType, width, height, bytes: buf.length, original: buf, display, thumbnail };
}
