// Draws the installable app's icons from the Roostline mark (src/components/logo.tsx) with sharp.
// Usage: npx tsx scripts/build-icons.ts   → public/icons/*.png (committed; the manifest in vite.config.ts names them)
import fs from 'node:fs';
import path from 'node:path';
import sharp from 'sharp';

// The mark on a 32-unit grid: night-teal tile, brass conductor, chalk core.
const MARK = '<path d="M3 13 Q16 21 29 13" stroke="#e8b04a" stroke-width="2.5" fill="none"/><circle cx="16" cy="14.5" r="4" fill="#f7f4ee"/><path d="M12 12h8" stroke="#12343b" stroke-width="1.5"/>';

/** Rounded tile ("any" purpose) or full-bleed square with the mark inside the 80 % safe zone ("maskable"). */
function svg(px: number, maskable: boolean) {
  const body = maskable
    ? `<rect width="32" height="32" fill="#12343b"/><g transform="translate(16 16) scale(0.72) translate(-16 -16)">${MARK}</g>`
    : `<rect width="32" height="32" rx="7" fill="#12343b"/>${MARK}`;
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${px}" height="${px}" viewBox="0 0 32 32">${body}</svg>`;
}

export const ICONS = [
  { file: 'icon-48.png', size: 48, maskable: false },
  { file: 'icon-72.png', size: 72, maskable: false },
  { file: 'icon-96.png', size: 96, maskable: false },
  { file: 'icon-144.png', size: 144, maskable: false },
  { file: 'icon-192.png', size: 192, maskable: false },
  { file: 'icon-512.png', size: 512, maskable: false },
  { file: 'maskable-192.png', size: 192, maskable: true },
  { file: 'maskable-512.png', size: 512, maskable: true },
  { file: 'apple-touch-icon.png', size: 180, maskable: true },
] as const;

const outDir = path.resolve('public/icons');
fs.mkdirSync(outDir, { recursive: true });
for (const icon of ICONS) {
  const png = await sharp(Buffer.from(svg(icon.size, icon.maskable)), { density: 72 * Math.max(1, icon.size / 32) })
    .resize(icon.size, icon.size)
    .png({ compressionLevel: 9 })
    .toBuffer();
  fs.writeFileSync(path.join(outDir, icon.file), png);
  console.log(`${icon.file} ${icon.size}×${icon.size} ${png.length} B`);
}
