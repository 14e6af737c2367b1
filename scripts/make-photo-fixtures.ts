// Writes the GPS-tagged JPEG fixtures of the photo tests with an independent tool (Debian's exiftool,
// `apt-get install -y libimage-exiftool-perl`), so the tests read committed files and need no EXIF tool themselves.
// Usage: npx tsx scripts/make-photo-fixtures.ts   (then commit tests/fixtures/photos/)
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import sharp from 'sharp';
import { destination, point } from '@turf/turf';

const dir = path.resolve('tests/fixtures/photos');
fs.mkdirSync(dir, { recursive: true });

/** Structure B of the photo test scenario, inside the invented demo box (southern and western hemispheres). */
const B = { lat: -30.2, lon: -130.3 };
const offset = (from: { lat: number; lon: number }, metres: number, bearingDeg: number) => {
  const [lon, lat] = destination(point([from.lon, from.lat]), metres / 1000, bearingDeg).geometry.coordinates;
  return { lat, lon };
};
const gps = (lat: number, lon: number, extra: string[] = []) => [`-GPSLatitude=${Math.abs(lat)}`, `-GPSLatitudeRef=${lat < 0 ? 'S' : 'N'}`, `-GPSLongitude=${Math.abs(lon)}`, `-GPSLongitudeRef=${lon < 0 ? 'W' : 'E'}`, ...extra];

/** A JPEG from sharp (a smooth gradient, so it compresses like a photo). */
async function gradient(width: number, height: number) {
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

const base = await gradient(400, 300);
const nearAb = offset(offset(B, 100, 270), 20, 0); // 20 m north of the middle of A–B
const nearB = offset(offset(B, 10, 0), 5, 270); // 10 m north, 5 m west of B
const farAway = offset(B, 500, 0);
const jobs: { name: string; args: string[]; base?: Buffer }[] = [
  // Four hemispheres, each with altitude, bearing and a capture time with its offset.
  { name: 'ne', args: gps(12.5, 45.25, ['-GPSAltitude=123.4', '-GPSAltitudeRef#=0', '-GPSImgDirection=271.5', '-GPSImgDirectionRef=T', '-DateTimeOriginal=2026:05:04 10:11:12', '-OffsetTimeOriginal=+09:30']) },
  { name: 'nw', args: gps(48.125, -3.75, ['-GPSAltitude=8', '-GPSAltitudeRef#=0', '-GPSImgDirection=90', '-GPSImgDirectionRef=M', '-DateTimeOriginal=2026:01:31 23:59:58', '-OffsetTimeOriginal=-03:00']) },
  { name: 'se', args: gps(-33.5, 151.25, ['-GPSAltitude=15.5', '-GPSAltitudeRef#=1', '-GPSImgDirection=5.25', '-GPSImgDirectionRef=T', '-DateTimeOriginal=2026:07:01 06:00:00', '-OffsetTimeOriginal=+00:00']) },
  { name: 'sw', args: gps(-22.75, -43.5, ['-GPSAltitude=2.25', '-GPSAltitudeRef#=1', '-GPSImgDirection=180', '-GPSImgDirectionRef=T', '-DateTimeOriginal=2026:12:24 18:30:00', '-OffsetTimeOriginal=-02:30']) },
  // No offset tag: the time is the camera's local time and must stay exactly as written.
  { name: 'localTime', args: ['-DateTimeOriginal=2026:03:08 02:30:00'] },
  { name: 'rotated', args: ['-Orientation#=6'] },
  { name: 'nearAb', args: gps(nearAb.lat, nearAb.lon) },
  { name: 'nearB', args: gps(nearB.lat, nearB.lon) },
  { name: 'farAway', args: gps(farAway.lat, farAway.lon) },
  // The browser journey's photo: 20 m north of its span's middle; noise makes it ~0.6 MB so a throttled upload takes seconds.
  {
    name: 'journey-span-photo',
    args: ['-GPSLatitude=30.19982', '-GPSLatitudeRef=S', '-GPSLongitude=130.29896', '-GPSLongitudeRef=W', '-DateTimeOriginal=2026:05:04 10:11:12', '-OffsetTimeOriginal=-09:00'],
    base: await sharp({ create: { width: 1200, height: 900, channels: 3, background: '#6a8', noise: { type: 'gaussian', mean: 120, sigma: 40 } } }).jpeg({ quality: 80 }).toBuffer(),
  },
];
for (const j of jobs) {
  const file = path.join(dir, `${j.name}.jpg`);
  fs.writeFileSync(file, j.base ?? base);
  execFileSync('exiftool', ['-q', '-overwrite_original', ...j.args, file]);
}
console.log(`Wrote ${jobs.length} fixtures to ${path.relative(process.cwd(), dir)}`);
