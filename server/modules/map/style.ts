import { createRequire } from 'node:module';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { DEMO_BBOX, DEMO_CENTER } from '#shared/demo-region.ts';

const require = createRequire(import.meta.url);

/** Committed map assets: the demo basemap and the sprite sheet. */
export const MAP_ASSETS_DIR = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../map-assets');

/** The label font ships with the app as an npm package; the style names it through `font-faces`. */
export const FONT_FILES: Record<string, string> = {
  'label-latin.woff2': require.resolve('@fontsource-variable/inter/files/inter-latin-wght-normal.woff2'),
  'label-latin-ext.woff2': require.resolve('@fontsource-variable/inter/files/inter-latin-ext-wght-normal.woff2'),
};

export const LABEL_FONT = 'Roostline Label';

/** The map style; every URL in it is on `origin` (the app itself). */
export function buildStyle(origin: string) {
  return {
    version: 8,
    name: 'Roostline',
    center: DEMO_CENTER,
    zoom: 10,
    'font-faces': {
      [LABEL_FONT]: [
        { url: `${origin}/map/fonts/label-latin.woff2`, 'unicode-range': ['U+0000-00FF', 'U+0131', 'U+0152-0153', 'U+02BB-02BC', 'U+02C6', 'U+02DA', 'U+02DC', 'U+2000-206F', 'U+20AC', 'U+2122', 'U+2191', 'U+2193', 'U+2212', 'U+2215', 'U+FEFF', 'U+FFFD'] },
        { url: `${origin}/map/fonts/label-latin-ext.woff2` },
      ],
    },
    sprite: `${origin}/map/sprites/sprite`,
    metadata: { 'roostline:bbox': [DEMO_BBOX.west, DEMO_BBOX.south, DEMO_BBOX.east, DEMO_BBOX.north] },
    sources: {},
    layers: [{ id: 'background', type: 'background', paint: { 'background-color': '#dfe7ea' } }],
  };
}
