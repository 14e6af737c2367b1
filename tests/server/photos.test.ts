// Photos: upload, EXIF, derivatives, serving, nearest-span suggestion, links, deletion, the orphan sweep.
// The same file runs on the local folder (project `node`) and on an S3 bucket of a local S3 fake (project `node-s3`,
// and the PostgreSQL run): every check reads the app's own store, whichever it is.
// The GPS-tagged files were written by an independent tool (Debian's exiftool, scripts/make-photo-fixtures.ts) and are
// committed in tests/fixtures/photos, so the tests need no EXIF tool; the code under test never wrote them.
// A time zone far from UTC with a half-hour offset makes any leak of the server's zone into capture times visible.
process.env.TZ = 'Pacific/Chatham';

import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import sharp from 'sharp';
import { destination, point } from '@turf/turf';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { MikroORM } from '@mikro-orm/sqlite';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';
import { Line } from '../../server/modules/inventory/line.entity.ts';
import { Structure } from '../../server/modules/inventory/structure.entity.ts';
import { Span } from '../../server/modules/inventory/span.entity.ts';
import { Hazard } from '../../server/modules/inventory/hazard.entity.ts';
import { Photo } from '../../server/modules/photos/photo.entity.ts';
import { AuditEntry } from '../../server/modules/audit/audit.entity.ts';
import { storePhotos, sweepOrphans } from '../../server/modules/photos/photo.service.ts';
import { processPhoto } from '../../server/modules/photos/photo.pipeline.ts';
import type { PhotoStorage } from '../../server/modules/photos/photo.storage.ts';

const MiB = 1024 * 1024;
const FIXTURES = path.resolve('tests/fixtures/photos');
let t: TestApp;
let tmp: string;
let uploadsDir: string;
let surveyor: Client;
let safety: Client;
let planner: Client;
let admin: Client;
const files: Record<string, Buffer> = {};
/** Span ids of the seeded scenario: A–B and B–C run west to east, 200 m each. */
const ids = { line: 'line-test-1', a: 'st-a', b: 'st-b', c: 'st-c', ab: 'span-ab', bc: 'span-bc', hazardAb: 'hz-ab' };
/** Structure B, inside the invented demo box (southern and western hemispheres). */
const B = { lat: -30.2, lon: -130.3 };
const offset = (from: { lat: number; lon: number }, metres: number, bearingDeg: number) => {
  const [lon, lat] = destination(point([from.lon, from.lat]), metres / 1000, bearingDeg).geometry.coordinates;
  return { lat, lon };
};

/** Keys now in the app's store under photos/ (files of the uploads folder, or objects of the bucket). */
async function storedFiles(): Promise<string[]> {
  return (await t.storage.list!('photos/')).map((k) => k.key).sort();
}

/** A JPEG from sharp (a smooth gradient, so it compresses like a photo), width × height. */
async function baseJpeg(width: number, height: number) {
  const raw = Buffer.alloc(width * height * 3);
  for (let y = 0; y < height; y++)
    for (let x = 0; x < width; x++) {
      const i = (y * width + x) * 3;
      raw[i] = (x * 255) / width;
      raw[i + 1] = (y * 255) / height;
      raw[i + 2] = 128;
    }
  return sharp(raw, { raw: { width, height, channels: 3 } }).jpeg({ quality: 85 }).toBuffer();
}

/** A real 1×1 PNG whose header is rewritten to claim width × height (CRC fixed), like a decompression bomb. */
async function pngClaiming(width: number, height: number) {
  const png = Buffer.from(await sharp({ create: { width: 1, height: 1, channels: 3, background: '#808080' } }).png().toBuffer());
  // Signature (8) + IHDR length (4) + "IHDR" (4) → width at 16, height at 20, CRC over type+data at 29.
  png.writeUInt32BE(width, 16);
  png.writeUInt32BE(height, 20);
  png.writeUInt32BE(zlib.crc32(png.subarray(12, 29)), 29);
  return png;
}

async function seedScenario(orm: MikroORM) {
  const em = orm.em.fork();
  const A = offset(B, 200, 270);
  const C = offset(B, 200, 90);
  em.persist(Object.assign(new Line(), { id: ids.line, name: 'Test feeder 1', owner: 'Harrow Vale Power Cooperative', voltageKv: 69, frequencyHz: 60, loadTypicalA: 300, loadMinA: 120, loadPeakA: 500 }));
  for (const [id, p, label] of [[ids.a, A, 'T-001'], [ids.b, B, 'T-002'], [ids.c, C, 'T-003']] as const)
    em.persist(Object.assign(new Structure(), { id, lineId: ids.line, lat: p.lat, lon: p.lon, kind: 'pole' as const, label, attachmentHeightM: 14 }));
  em.persist(Object.assign(new Span(), { id: ids.ab, lineId: ids.line, fromStructureId: ids.a, toStructureId: ids.b, lengthM: 200 }));
  em.persist(Object.assign(new Span(), { id: ids.bc, lineId: ids.line, fromStructureId: ids.b, toStructureId: ids.c, lengthM: 200 }));
  em.persist(Object.assign(new Hazard(), { id: ids.hazardAb, spanId: ids.ab, kindId: 'road-crossing', severity: 'high' as const, positionAlongM: 80 }));
  await em.flush();
}

beforeAll(async () => {
  tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'roostline-photos-'));
  uploadsDir = path.join(tmp, 'uploads');
  const base = await baseJpeg(400, 300);
  files.plain = base;
  // Four hemispheres with altitude, bearing and offset time; a local time; a rotated file; three positions near the spans.
  for (const name of ['ne', 'nw', 'se', 'sw', 'localTime', 'rotated', 'nearAb', 'nearB', 'farAway']) files[name] = fs.readFileSync(path.join(FIXTURES, `${name}.jpg`));
  files.truncated = files.ne.subarray(0, Math.floor(files.ne.length * 0.6));
  files.webpGps = await sharp(files.se).keepExif().webp().toBuffer();
  files.png = await sharp(base).png().toBuffer();
  files.avif = await sharp(base).avif().toBuffer();
  files.gif = await sharp(base).gif().toBuffer();
  files.svg = Buffer.from('<svg xmlns="http://www.w3.org/2000/svg" width="10" height="10"><rect width="10" height="10" fill="red"/></svg>');
  files.text = Buffer.from('These are field notes, not an image.\n');
  // An ISO-BMFF box that says "HEIC", the format phones write and this server cannot decode.
  files.heic = Buffer.concat([Buffer.from([0, 0, 0, 0x18]), Buffer.from('ftypheic'), Buffer.from([0, 0, 0, 0]), Buffer.from('mif1heic'), Buffer.alloc(512, 7)]);
  files.bomb = await pngClaiming(30_000, 30_000);
  t = await makeTestApp({ uploadsDir }, { seed: seedScenario });
  [surveyor, safety, planner, admin] = await Promise.all([t.as('surveyor'), t.as('safety'), t.as('planner'), t.as('admin')]);
}, 120_000);

afterAll(async () => {
  await t?.close();
  if (tmp) fs.rmSync(tmp, { recursive: true, force: true });
});

const upload = (c: Client, name: string, opts: { filename?: string; contentType?: string; spanId?: string } = {}) => {
  const req = c.upload('/api/photos').attach('photo', files[name], { filename: opts.filename ?? `${name}.jpg`, contentType: opts.contentType ?? 'image/jpeg' });
  return opts.spanId ? req.field('spanId', opts.spanId) : req;
};

describe('EXIF from files tagged by an independent tool', () => {
  // Hemisphere signs: EXIF 2.32 §4.6.6 (GPSLatitudeRef 'N'/'S', GPSLongitudeRef 'E'/'W'; S and W are negative in WGS84 decimal degrees).
  // GPSAltitudeRef 1 = below sea level (EXIF 2.32 §4.6.6, tag 0x0005). OffsetTimeOriginal (EXIF 2.31+, tag 0x9011) gives "±HH:MM".
  it.each([
    { name: 'ne', lat: 12.5, lon: 45.25, altitudeM: 123.4, bearingDeg: 271.5, bearingRef: 'T', takenAt: '2026-05-04T10:11:12+09:30' },
    { name: 'nw', lat: 48.125, lon: -3.75, altitudeM: 8, bearingDeg: 90, bearingRef: 'M', takenAt: '2026-01-31T23:59:58-03:00' },
    { name: 'se', lat: -33.5, lon: 151.25, altitudeM: -15.5, bearingDeg: 5.25, bearingRef: 'T', takenAt: '2026-07-01T06:00:00+00:00' },
    { name: 'sw', lat: -22.75, lon: -43.5, altitudeM: -2.25, bearingDeg: 180, bearingRef: 'T', takenAt: '2026-12-24T18:30:00-02:30' },
  ])('when a $name-hemisphere JPEG is uploaded, then position, altitude, bearing and time come back signed and with the file’s own offset', async (c) => {
    const res = await upload(surveyor, c.name);
    expect(res.status).toBe(201);
    expect(res.body.lat).toBeCloseTo(c.lat, 6);
    expect(res.body.lon).toBeCloseTo(c.lon, 6);
    expect(res.body.altitudeM).toBeCloseTo(c.altitudeM, 3);
    expect(res.body.bearingDeg).toBeCloseTo(c.bearingDeg, 3);
    expect(res.body.bearingRef).toBe(c.bearingRef);
    expect(res.body.takenAt).toBe(c.takenAt);
    expect(res.body.takenAtHasOffset).toBe(true);
    expect(res.body.positionSource).toBe('exif');
    expect(res.body.suggestedSpanIds).toEqual([]);
    expect(res.body.thumbnailUrl).toBe(`/api/photos/${res.body.id}/thumbnail`);
    expect(res.body.displayUrl).toBe(`/api/photos/${res.body.id}/display`);
  });

  it('when the file has a capture time but no offset, then the local time is returned as written, marked as without offset', async () => {
    const res = await upload(surveyor, 'localTime');
    expect(res.status).toBe(201);
    // 02:30 on 8 March falls in no DST gap of the file (it has no zone); the server's own zone (Pacific/Chatham here) must not shift it.
    expect(res.body.takenAt).toBe('2026-03-08T02:30:00');
    expect(res.body.takenAtHasOffset).toBe(false);
  });

  it('when the file has no GPS, then the position fields are null and nothing is suggested', async () => {
    const res = await upload(surveyor, 'plain');
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ lat: null, lon: null, altitudeM: null, bearingDeg: null, takenAt: null, positionSource: null, suggestedSpanIds: [] });
  });

  it('when a WebP carries EXIF GPS, then it is read too (from the EXIF block sharp hands over)', async () => {
    const res = await upload(surveyor, 'webpGps', { filename: 'x.webp', contentType: 'image/webp' });
    expect(res.status).toBe(201);
    expect(res.body.contentType).toBe('image/webp');
    expect(res.body.lat).toBeCloseTo(-33.5, 6);
    expect(res.body.lon).toBeCloseTo(151.25, 6);
  });
});

describe('derivatives', () => {
  it('when the file says Orientation 6 (rotate 90° clockwise), then thumbnail and display come out upright, without metadata', async () => {
    const res = await upload(surveyor, 'rotated');
    expect(res.status).toBe(201);
    // Stored pixels are 400 × 300; Orientation=6 means the upright picture is 300 wide, 400 high (EXIF 2.32 §4.6.4, tag 0x0112).
    expect(res.body).toMatchObject({ width: 300, height: 400 });
    const thumb = await surveyor.get(res.body.thumbnailUrl).buffer(true);
    const tm = await sharp(thumb.body).metadata();
    expect([tm.width, tm.height]).toEqual([240, 320]);
    expect(tm.orientation).toBeUndefined();
    expect(tm.exif).toBeUndefined();
    const display = await surveyor.get(res.body.displayUrl).buffer(true);
    const dm = await sharp(display.body).metadata();
    expect([dm.width, dm.height]).toEqual([300, 400]);
    expect(dm.orientation).toBeUndefined();
  });

  it('when a GPS-tagged photo is uploaded, then its derivatives carry no EXIF but the original is kept byte for byte', async () => {
    const res = await upload(surveyor, 'ne');
    const thumb = await surveyor.get(res.body.thumbnailUrl).buffer(true);
    expect((await sharp(thumb.body).metadata()).exif).toBeUndefined();
    const display = await surveyor.get(res.body.displayUrl).buffer(true);
    expect((await sharp(display.body).metadata()).exif).toBeUndefined();
    const original = await surveyor.get(`/api/photos/${res.body.id}/original`).buffer(true);
    expect(Buffer.compare(original.body, files.ne)).toBe(0);
  });

  it.each([
    { name: 'png', type: 'image/png' },
    { name: 'avif', type: 'image/avif' },
  ])('when a $type is uploaded, then it is accepted and served with its own type', async ({ name, type }) => {
    const res = await upload(surveyor, name, { filename: 'a.bin', contentType: 'application/octet-stream' });
    expect(res.status).toBe(201);
    expect(res.body.contentType).toBe(type);
    const original = await surveyor.get(`/api/photos/${res.body.id}/original`);
    expect(original.headers['content-type']).toBe(type);
  });
});

describe('transparency', () => {
  it('when a PNG has transparent areas, then its JPEG derivatives show them white', async () => {
    files.clear = await sharp({ create: { width: 40, height: 40, channels: 4, background: { r: 0, g: 0, b: 0, alpha: 0 } } }).png().toBuffer();
    const res = await upload(surveyor, 'clear', { contentType: 'image/png' });
    expect(res.status).toBe(201);
    const display = await surveyor.get(res.body.displayUrl).buffer(true);
    const { data } = await sharp(display.body).raw().toBuffer({ resolveWithObject: true });
    expect(Math.min(...data)).toBeGreaterThan(245);
  });
});

describe('refused files leave nothing behind', () => {
  it.each([
    { name: 'text', status: 415, contentType: 'image/jpeg', text: /JPEG, PNG, WebP or AVIF/ },
    { name: 'svg', status: 415, contentType: 'image/svg+xml', text: /SVG is not a supported image.*JPEG, PNG, WebP or AVIF/ },
    { name: 'heic', status: 415, contentType: 'image/heic', text: /JPEG, PNG, WebP or AVIF/ },
    { name: 'gif', status: 415, contentType: 'image/jpeg', text: /GIF is not a supported image/ },
    { name: 'truncated', status: 400, contentType: 'image/jpeg', text: /truncated or damaged/ },
    { name: 'bomb', status: 413, contentType: 'image/png', text: /30000 × 30000 pixels.*megapixel limit/ },
  ])('when the upload is $name, then $status with a clear message and no file is stored', async ({ name, status, contentType, text }) => {
    const before = await storedFiles();
    const rows = await t.orm.em.fork().count(Photo);
    const res = await upload(surveyor, name, { contentType });
    expect(res.status).toBe(status);
    expect(res.body.error.message).toMatch(text);
    expect(await storedFiles()).toEqual(before);
    expect(await t.orm.em.fork().count(Photo)).toBe(rows);
  });

  it('when the file is over 25 MB, then 413 in the shared error shape and nothing is stored', async () => {
    const before = await storedFiles();
    const big = Buffer.alloc(25 * MiB + 1, 0x5a);
    files.big = Buffer.concat([Buffer.from([0xff, 0xd8, 0xff, 0xe0]), big.subarray(4)]);
    const res = await upload(surveyor, 'big');
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('payload_too_large');
    expect(res.body.error.message).toMatch(/larger than 25 MB/);
    expect(await storedFiles()).toEqual(before);
  });

  it('when no file is attached, then 400 names the photo field', async () => {
    const res = await surveyor.upload('/api/photos').field('spanId', ids.ab);
    expect(res.status).toBe(400);
    expect(res.body.error.issues).toEqual([expect.objectContaining({ path: 'photo' })]);
  });

  it('when the span id does not exist, then 400 names spanId and nothing is stored', async () => {
    const before = await storedFiles();
    const res = await upload(surveyor, 'ne', { spanId: 'no-such-span' });
    expect(res.status).toBe(400);
    expect(res.body.error.issues).toEqual([expect.objectContaining({ path: 'spanId' })]);
    expect(await storedFiles()).toEqual(before);
  });

  it('when one of several files in a batch is bad, then the whole batch is refused and nothing is stored', async () => {
    const before = await storedFiles();
    const res = await surveyor
      .upload('/api/photos')
      .attach('photos', files.ne, { filename: 'a.jpg', contentType: 'image/jpeg' })
      .attach('photos', files.text, { filename: 'b.jpg', contentType: 'image/jpeg' });
    expect(res.status).toBe(415);
    expect(await storedFiles()).toEqual(before);
  });

  it('when storage fails half-way through writing a batch, then the files already written are deleted again', async () => {
    const before = await storedFiles();
    const store = t.storage;
    let puts = 0;
    const flaky: PhotoStorage = { ...store, put: async (k, d, c) => (++puts === 5 ? Promise.reject(new Error('disk full')) : store.put(k, d, c)) };
    const items = [await processPhoto(files.ne), await processPhoto(files.nw)];
    const em = t.orm.em.fork();
    const rows = await em.count(Photo);
    await expect(storePhotos(em, flaky, items, { uploaderId: 'someone', spanId: null, hazardId: null })).rejects.toThrow('disk full');
    expect(puts).toBe(5);
    expect(await storedFiles()).toEqual(before);
    expect(await t.orm.em.fork().count(Photo)).toBe(rows);
  });

  it('when files without a photo row are older than an hour, then the orphan sweep removes them and keeps the rest', async () => {
    const ok = await upload(surveyor, 'plain');
    const store = t.storage;
    await store.put('photos/orphanold.original', files.plain, 'image/jpeg');
    await store.put('photos/orphanold.thumb.jpg', files.plain, 'image/jpeg');
    // Written just now: too young for the sweep, as an upload still on its way would be.
    expect(await sweepOrphans(t.orm.em.fork(), store)).toEqual([]);
    expect(await storedFiles()).toEqual(expect.arrayContaining(['photos/orphanold.original', 'photos/orphanold.thumb.jpg']));
    // Two hours on (the sweep's clock, since an object store's times cannot be set back), both are orphans over an hour old.
    const later = new Date(Date.now() + 2 * 3600_000);
    await store.put('photos/orphannew.original', files.plain, 'image/jpeg');
    const removed = await sweepOrphans(t.orm.em.fork(), store, 60 * 60_000, later);
    expect(removed).toEqual(expect.arrayContaining(['photos/orphanold.original', 'photos/orphanold.thumb.jpg', 'photos/orphannew.original']));
    expect(removed.every((k) => k.startsWith('photos/orphan'))).toBe(true);
    const left = await storedFiles();
    expect(left.some((k) => k.includes('orphan'))).toBe(false);
    expect(left).toEqual(expect.arrayContaining([`photos/${ok.body.id}.original`, `photos/${ok.body.id}.display.jpg`, `photos/${ok.body.id}.thumb.jpg`]));
    expect((await surveyor.get(ok.body.originalUrl)).status).toBe(200);
  });

  it('when the client’s file name tries to climb out of the folder, then it never reaches the file system', async () => {
    const res = await upload(surveyor, 'plain', { filename: '../../escape-attempt.jpg' });
    expect(res.status).toBe(201);
    const stored = await storedFiles();
    expect(stored.some((f) => f.includes('escape'))).toBe(false);
    expect(fs.readdirSync(tmp).some((f) => f.includes('escape'))).toBe(false);
    for (const f of stored) expect(f).toMatch(/^photos\/[a-z0-9]+\.(original|display\.jpg|thumb\.jpg)$/);
    expect(stored).toEqual(expect.arrayContaining([`photos/${res.body.id}.original`, `photos/${res.body.id}.display.jpg`, `photos/${res.body.id}.thumb.jpg`]));
  });
});

describe('several files at once', () => {
  it('when two photos come in the photos field, then 201 lists both', async () => {
    const res = await surveyor
      .upload('/api/photos')
      .attach('photos', files.ne, { filename: 'a.jpg', contentType: 'image/jpeg' })
      .attach('photos', files.sw, { filename: 'b.jpg', contentType: 'image/jpeg' });
    expect(res.status).toBe(201);
    expect(res.body.items).toHaveLength(2);
    expect(res.body.items[1].lat).toBeCloseTo(-22.75, 6);
  });

  it('when more than 8 files come at once, then 413', async () => {
    let req = surveyor.upload('/api/photos');
    for (let i = 0; i < 9; i++) req = req.attach('photos', files.plain, { filename: `p${i}.jpg`, contentType: 'image/jpeg' });
    const res = await req;
    expect(res.status).toBe(413);
  });
});

describe('who may do what', () => {
  it('when nobody is signed in, then upload and files answer 401', async () => {
    const res = await upload(t.client(), 'ne');
    expect(res.status).toBe(401);
    const ok = await upload(surveyor, 'ne');
    expect((await t.client().get(ok.body.thumbnailUrl)).status).toBe(401);
    expect((await t.client().get(`/api/photos/${ok.body.id}`)).status).toBe(401);
  });

  it.each([
    { role: 'planner', status: 403 },
    { role: 'admin', status: 403 },
    { role: 'safety', status: 201 },
  ])('when the $role uploads, then $status', async ({ role, status }) => {
    const c = { planner, admin, safety }[role]!;
    const res = await upload(c, 'ne');
    expect(res.status).toBe(status);
  });

  it('when any signed-in role fetches a file, then it is served with its type, nosniff, a private cache and an ETag', async () => {
    const ok = await upload(surveyor, 'ne');
    for (const c of [surveyor, safety, planner, admin]) {
      const res = await c.get(ok.body.thumbnailUrl).buffer(true);
      expect(res.status).toBe(200);
      expect(res.headers['content-type']).toBe('image/jpeg');
      expect(res.headers['x-content-type-options']).toBe('nosniff');
      expect(res.headers['cache-control']).toMatch(/^private, max-age=\d+/);
      expect(res.headers.etag).toMatch(/^".+"$/);
      expect((await sharp(res.body).metadata()).format).toBe('jpeg');
    }
    const first = await planner.get(ok.body.displayUrl);
    const again = await planner.get(ok.body.displayUrl).set('If-None-Match', first.headers.etag);
    expect(again.status).toBe(304);
    expect((await planner.get(`/api/photos/${ok.body.id}/elsewhere`)).status).toBe(404);
  });

  it('when someone other than the uploader or an admin deletes, then 403; the uploader and an admin may', async () => {
    const mine = await upload(surveyor, 'ne');
    expect((await safety.delete(`/api/photos/${mine.body.id}`)).status).toBe(403);
    expect((await planner.delete(`/api/photos/${mine.body.id}`)).status).toBe(403);
    expect((await surveyor.delete(`/api/photos/${mine.body.id}`)).status).toBe(204);
    expect((await storedFiles()).some((f) => f.includes(mine.body.id))).toBe(false);
    expect((await surveyor.get(mine.body.thumbnailUrl)).status).toBe(404);
    const theirs = await upload(safety, 'nw');
    expect((await admin.delete(`/api/photos/${theirs.body.id}`)).status).toBe(204);
    expect((await admin.get(`/api/photos/${theirs.body.id}`)).status).toBe(404);
    const audits = await t.orm.em.fork().find(AuditEntry, { recordType: 'photo', recordId: theirs.body.id });
    expect(audits.map((a) => a.action).sort()).toEqual(['photo.delete', 'photo.upload']);
  });
});

describe('nearest span and links', () => {
  it('when a photo is 20 m from the middle of one span, then only that span is suggested', async () => {
    const res = await upload(surveyor, 'nearAb');
    expect(res.status).toBe(201);
    expect(res.body.suggestedSpanIds).toEqual([ids.ab]);
    expect(res.body.suggestions[0].distanceM).toBeCloseTo(20, 0);
  });

  it('when a photo is near the shared structure, then both spans are suggested, nearest first', async () => {
    const res = await upload(surveyor, 'nearB');
    expect(res.body.suggestedSpanIds).toEqual([ids.ab, ids.bc]);
    expect(res.body.suggestions[0].distanceM).toBeCloseTo(10, 0);
    expect(res.body.suggestions[1].distanceM).toBeCloseTo(Math.hypot(10, 5), 0);
  });

  it('when a photo is 500 m away, then nothing is within 60 m', async () => {
    const res = await upload(surveyor, 'farAway');
    expect(res.body.suggestedSpanIds).toEqual([]);
  });

  it('when the surveyor confirms a span, then the photo lists under it and shows on the map layer', async () => {
    const up = await upload(surveyor, 'nearAb');
    const res = await surveyor.patch(`/api/photos/${up.body.id}`, { spanId: ids.ab });
    expect(res.status).toBe(200);
    expect(res.body.spanId).toBe(ids.ab);
    const list = await planner.get(`/api/photos?spanId=${ids.ab}`);
    expect(list.body.items.map((p: { id: string }) => p.id)).toContain(up.body.id);
    const geo = await planner.get(`/api/photos/geojson?spanId=${ids.ab}`);
    expect(geo.body.type).toBe('FeatureCollection');
    const f = geo.body.features.find((x: { id: string }) => x.id === up.body.id);
    expect(f.geometry.coordinates[1]).toBeCloseTo(up.body.lat, 9);
    expect(f.properties.thumbnailUrl).toBe(up.body.thumbnailUrl);
  });

  it('when a photo is uploaded with a spanId, then it is linked at once', async () => {
    const res = await upload(surveyor, 'plain', { spanId: ids.bc });
    expect(res.status).toBe(201);
    expect(res.body.spanId).toBe(ids.bc);
  });

  it('when a photo without GPS is placed by hand, then it gets the position, marked manual, and suggestions', async () => {
    const up = await upload(surveyor, 'plain');
    const unplaced = await surveyor.get('/api/photos?unplaced=true');
    expect(unplaced.body.items.map((p: { id: string }) => p.id)).toContain(up.body.id);
    const at = offset(B, 30, 180);
    const res = await surveyor.patch(`/api/photos/${up.body.id}`, { lat: at.lat, lon: at.lon });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ lat: at.lat, lon: at.lon, positionSource: 'manual' });
    expect(res.body.suggestedSpanIds).toEqual(expect.arrayContaining([ids.ab, ids.bc]));
  });

  it('when a photo is linked to a hazard, then it joins the hazard’s span; a hazard of another span is refused', async () => {
    const up = await upload(surveyor, 'plain');
    const res = await surveyor.patch(`/api/photos/${up.body.id}`, { hazardId: ids.hazardAb });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ hazardId: ids.hazardAb, spanId: ids.ab });
    const wrong = await surveyor.patch(`/api/photos/${up.body.id}`, { spanId: ids.bc, hazardId: ids.hazardAb });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.issues[0].path).toBe('hazardId');
    // Moving the photo to another span drops the old span's hazard link.
    const moved = await surveyor.patch(`/api/photos/${up.body.id}`, { spanId: ids.bc });
    expect(moved.body).toMatchObject({ spanId: ids.bc, hazardId: null });
    const listed = await planner.get(`/api/photos?hazardId=${ids.hazardAb}`);
    expect(listed.body.items.map((p: { id: string }) => p.id)).not.toContain(up.body.id);
  });

  it('when a link or position is not valid, then 400 names the field; a planner may not change photos', async () => {
    const up = await upload(surveyor, 'plain');
    const bad = await surveyor.patch(`/api/photos/${up.body.id}`, { spanId: 'nope' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.issues[0].path).toBe('spanId');
    const half = await surveyor.patch(`/api/photos/${up.body.id}`, { lat: 10 });
    expect(half.status).toBe(400);
    expect(half.body.error.issues[0].path).toBe('lon');
    const range = await surveyor.patch(`/api/photos/${up.body.id}`, { lat: 91, lon: 0 });
    expect(range.status).toBe(400);
    expect(range.body.error.issues[0].path).toBe('lat');
    expect((await planner.patch(`/api/photos/${up.body.id}`, { spanId: ids.ab })).status).toBe(403);
    expect((await surveyor.patch('/api/photos/no-such-photo', { spanId: ids.ab })).status).toBe(404);
  });
});

describe('the store in use', () => {
  it('when a photo is uploaded, then its files are in the configured store and nowhere else', async () => {
    const res = await upload(surveyor, 'plain');
    expect(t.storage.kind).toBe(process.env.ROOSTLINE_TEST_STORAGE === 's3' ? 's3' : 'local');
    expect(t.storage.describe).toBe(t.config.storageUrl ? t.storage.describe : uploadsDir);
    const onDisk = fs.existsSync(path.join(uploadsDir, 'photos', `${res.body.id}.original`));
    expect(onDisk).toBe(t.storage.kind === 'local');
    const obj = await t.storage.get(`photos/${res.body.id}.original`);
    const chunks: Buffer[] = [];
    for await (const c of obj!.body) chunks.push(c as Buffer);
    expect(Buffer.compare(Buffer.concat(chunks), files.plain)).toBe(0);
    expect(obj!.bytes).toBe(files.plain.length);
  });
});
