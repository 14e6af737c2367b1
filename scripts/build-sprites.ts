// Draws the map's small sprite sheet (town dot, photo marker, structure marks) from SVG with sharp, at 1x and 2x.
// Usage: npx tsx scripts/build-sprites.ts   → server/map-assets/sprites/sprite{,@2x}.{png,json}
import fs from 'node:fs';
import path from 'node:path';
import sharp from 'sharp';

const ICONS: Record<string, { size: number; svg: string }> = {
  town: { size: 12, svg: '<circle cx="6" cy="6" r="4.2" fill="#f7f4ee" stroke="#12343b" stroke-width="1.8"/>' },
  photo: {
    size: 22,
    svg: '<circle cx="11" cy="11" r="10" fill="#12343b"/><rect x="5" y="7.5" width="12" height="8.5" rx="1.6" fill="#f7f4ee"/><rect x="8" y="6" width="4" height="2.2" fill="#f7f4ee"/><circle cx="11" cy="11.8" r="2.6" fill="#12343b"/>',
  },
  'structure-pole': { size: 12, svg: '<circle cx="6" cy="6" r="4.5" fill="#ffffff" stroke="#12343b" stroke-width="2"/>' },
  'structure-tower': { size: 14, svg: '<rect x="2" y="2" width="10" height="10" fill="#ffffff" stroke="#12343b" stroke-width="2" transform="rotate(45 7 7)"/>' },
};

async function build(outDir: string, ratio: 1 | 2) {
  const pad = 2;
  let x = 0;
  const layout: Record<string, { x: number; y: number; width: number; height: number; pixelRatio: number }> = {};
  const parts: { input: Buffer; left: number; top: number }[] = [];
  let height = 0;
  for (const [name, icon] of Object.entries(ICONS)) {
    const px = icon.size * ratio;
    const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${px}" height="${px}" viewBox="0 0 ${icon.size} ${icon.size}">${icon.svg}</svg>`;
    parts.push({ input: await sharp(Buffer.from(svg)).png().toBuffer(), left: x, top: 0 });
    layout[name] = { x, y: 0, width: px, height: px, pixelRatio: ratio };
    x += px + pad * ratio;
    height = Math.max(height, px);
  }
  const suffix = ratio === 2 ? '@2x' : '';
  const png = await sharp({ create: { width: x, height, channels: 4, background: { r: 0, g: 0, b: 0, alpha: 0 } } })
    .composite(parts)
    .png()
    .toBuffer();
  fs.writeFileSync(path.join(outDir, `sprite${suffix}.png`), png);
  fs.writeFileSync(path.join(outDir, `sprite${suffix}.json`), JSON.stringify(layout, null, 2) + '\n');
}

const outDir = path.resolve('server/map-assets/sprites');
fs.mkdirSync(outDir, { recursive: true });
await build(outDir, 1);
await build(outDir, 2);
console.log(`Wrote sprites to ${outDir}: ${Object.keys(ICONS).join(', ')}`);
