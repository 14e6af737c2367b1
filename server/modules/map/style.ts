import fs from 'node:fs';
import { createRequire } from 'node:module';
import { bytesToHeader } from 'pmtiles';
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

// Roostline's own basemap palette: muted land, cool water, warm roads; overlays (spans, zones) stand out on it.
const PALETTE = {
  sea: '#a9c6cf',
  land: '#eceee3',
  farmland: '#ebe5cc',
  meadow: '#dfe8c8',
  forest: '#bfd4b0',
  residential: '#e4dcd2',
  water: '#a9c6cf',
  waterLine: '#8fb3be',
  roadCasing: '#b5a583',
  roadMain: '#fbf6ea',
  roadMinor: '#ffffff',
  track: '#b8a98e',
  label: '#12343b',
  labelHalo: '#f7f4ee',
  waterLabel: '#3f6f7c',
};

const text = (size: unknown, color = PALETTE.label) => ({
  layout: { 'text-font': [LABEL_FONT], 'text-size': size },
  paint: { 'text-color': color, 'text-halo-color': PALETTE.labelHalo, 'text-halo-width': 1.4 },
});

/** Basemap layers over the source-layers written by scripts/build-basemap.ts. */
export function basemapLayers() {
  const b = { source: 'basemap' };
  return [
    { id: 'background', type: 'background', paint: { 'background-color': PALETTE.sea } },
    { id: 'land', type: 'fill', ...b, 'source-layer': 'land', paint: { 'fill-color': PALETTE.land } },
    { id: 'landuse-farmland', type: 'fill', ...b, 'source-layer': 'landuse', filter: ['in', ['get', 'class'], ['literal', ['farmland', 'meadow']]], paint: { 'fill-color': ['match', ['get', 'class'], 'meadow', PALETTE.meadow, PALETTE.farmland], 'fill-outline-color': '#d9d0ad' } },
    { id: 'landuse-forest', type: 'fill', ...b, 'source-layer': 'landuse', filter: ['==', ['get', 'class'], 'forest'], paint: { 'fill-color': PALETTE.forest } },
    { id: 'landuse-residential', type: 'fill', ...b, 'source-layer': 'landuse', filter: ['==', ['get', 'class'], 'residential'], paint: { 'fill-color': PALETTE.residential } },
    { id: 'water', type: 'fill', ...b, 'source-layer': 'water', paint: { 'fill-color': PALETTE.water } },
    {
      id: 'waterway',
      type: 'line',
      ...b,
      'source-layer': 'waterway',
      layout: { 'line-cap': 'round', 'line-join': 'round' },
      paint: { 'line-color': PALETTE.waterLine, 'line-width': ['interpolate', ['linear'], ['zoom'], 8, ['match', ['get', 'class'], 'river', 1.2, 0.6], 14, ['match', ['get', 'class'], 'river', 7, 3]] },
    },
    { id: 'road-track', type: 'line', ...b, 'source-layer': 'roads', minzoom: 11, filter: ['==', ['get', 'class'], 'track'], paint: { 'line-color': PALETTE.track, 'line-width': 1, 'line-dasharray': [3, 2] } },
    {
      id: 'road-casing',
      type: 'line',
      ...b,
      'source-layer': 'roads',
      filter: ['in', ['get', 'class'], ['literal', ['main', 'secondary', 'street']]],
      layout: { 'line-cap': 'round', 'line-join': 'round' },
      paint: { 'line-color': PALETTE.roadCasing, 'line-width': ['interpolate', ['linear'], ['zoom'], 8, ['match', ['get', 'class'], 'main', 2, 'secondary', 1.4, 0.6], 15, ['match', ['get', 'class'], 'main', 11, 'secondary', 8, 5]] },
    },
    {
      id: 'road',
      type: 'line',
      ...b,
      'source-layer': 'roads',
      filter: ['in', ['get', 'class'], ['literal', ['main', 'secondary', 'street']]],
      layout: { 'line-cap': 'round', 'line-join': 'round' },
      paint: {
        'line-color': ['match', ['get', 'class'], 'main', PALETTE.roadMain, PALETTE.roadMinor],
        'line-width': ['interpolate', ['linear'], ['zoom'], 8, ['match', ['get', 'class'], 'main', 1, 'secondary', 0.6, 0.2], 15, ['match', ['get', 'class'], 'main', 8, 'secondary', 6, 3.5]],
      },
    },
    { id: 'road-label', type: 'symbol', ...b, 'source-layer': 'roads', minzoom: 12, filter: ['has', 'name'], layout: { ...text(12).layout, 'symbol-placement': 'line', 'text-field': ['get', 'name'] }, paint: text(12).paint },
    { id: 'waterway-label', type: 'symbol', ...b, 'source-layer': 'waterway', minzoom: 11, layout: { ...text(12).layout, 'symbol-placement': 'line', 'text-field': ['get', 'name'], 'text-letter-spacing': 0.1 }, paint: text(12, PALETTE.waterLabel).paint },
    { id: 'forest-label', type: 'symbol', ...b, 'source-layer': 'landuse', minzoom: 12, filter: ['==', ['get', 'class'], 'forest'], layout: { ...text(11).layout, 'text-field': ['get', 'name'] }, paint: text(11, '#3e5e34').paint },
    { id: 'water-label', type: 'symbol', ...b, 'source-layer': 'places', minzoom: 11, filter: ['==', ['get', 'class'], 'water'], layout: { ...text(12).layout, 'text-field': ['get', 'name'] }, paint: text(12, PALETTE.waterLabel).paint },
    {
      id: 'place-label',
      type: 'symbol',
      ...b,
      'source-layer': 'places',
      filter: ['in', ['get', 'class'], ['literal', ['town', 'village']]],
      layout: {
        ...text(['interpolate', ['linear'], ['zoom'], 9, ['match', ['get', 'class'], 'town', 13, 11], 14, ['match', ['get', 'class'], 'town', 20, 16]]).layout,
        'text-field': ['get', 'name'],
        'icon-image': 'town',
        'text-offset': [0, 0.9],
        'text-anchor': 'top',
      },
      paint: text(14).paint,
    },
  ];
}

export interface BasemapExtent {
  bbox: [number, number, number, number];
  center: [number, number];
  zoom: number;
  /** The zooms the file holds; the map overzooms above the highest. */
  minZoom: number;
  maxZoom: number;
}

const extentCache = new Map<string, { mtimeMs: number; extent: BasemapExtent }>();

/**
 * Bounds and centre of the configured basemap, from its PMTiles header, so a user's own region opens where it is;
 * the demo region when the file cannot be read.
 */
export function basemapExtent(file: string): BasemapExtent {
  const fallback: BasemapExtent = { bbox: [DEMO_BBOX.west, DEMO_BBOX.south, DEMO_BBOX.east, DEMO_BBOX.north], center: DEMO_CENTER, zoom: 10, minZoom: 0, maxZoom: 14 };
  try {
    const { mtimeMs } = fs.statSync(file);
    const cached = extentCache.get(file);
    if (cached && cached.mtimeMs === mtimeMs) return cached.extent;
    const fd = fs.openSync(file, 'r');
    const bytes = Buffer.alloc(127);
    try {
      fs.readSync(fd, bytes, 0, 127, 0);
    } finally {
      fs.closeSync(fd);
    }
    if (bytes.subarray(0, 7).toString() !== 'PMTiles') return fallback;
    const h = bytesToHeader(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + 127) as ArrayBuffer);
    const valid = h.minLon < h.maxLon && h.minLat < h.maxLat;
    const extent: BasemapExtent = valid
      ? { bbox: [h.minLon, h.minLat, h.maxLon, h.maxLat], center: [h.centerLon, h.centerLat], zoom: h.centerZoom || Math.max(h.minZoom, 10), minZoom: h.minZoom, maxZoom: h.maxZoom }
      : fallback;
    extentCache.set(file, { mtimeMs, extent });
    return extent;
  } catch {
    return fallback;
  }
}

/** The map style; every URL in it is on `origin` (the app itself). Overlay layers are added by the client. */
export function buildStyle(origin: string, extent: BasemapExtent = basemapExtent('')) {
  return {
    version: 8,
    name: 'Roostline',
    center: extent.center,
    zoom: extent.zoom,
    'font-faces': {
      [LABEL_FONT]: [
        { url: `${origin}/map/fonts/label-latin.woff2`, 'unicode-range': ['U+0000-00FF', 'U+0131', 'U+0152-0153', 'U+02BB-02BC', 'U+02C6', 'U+02DA', 'U+02DC', 'U+2000-206F', 'U+20AC', 'U+2122', 'U+2191', 'U+2193', 'U+2212', 'U+2215', 'U+FEFF', 'U+FFFD'] },
        { url: `${origin}/map/fonts/label-latin-ext.woff2` },
      ],
    },
    sprite: `${origin}/map/sprites/sprite`,
    // The client keeps the view near the basemap's region with this box.
    metadata: { 'roostline:bbox': extent.bbox },
    sources: {
      // Tile by tile (read out of the PMTiles file by the server), so an area taken offline keeps exactly its tiles.
      basemap: { type: 'vector', tiles: [`${origin}/map/basemap/{z}/{x}/{y}.mvt`], minzoom: extent.minZoom, maxzoom: extent.maxZoom },
      // Spans and structures come in the same server tiles (layers `spans` and `structures`).
      spans: { type: 'vector', tiles: [`${origin}/api/tiles/spans/{z}/{x}/{y}.mvt`], minzoom: 0, maxzoom: 16, promoteId: { spans: 'id', structures: 'id' } },
      zones: { type: 'geojson', data: `${origin}/api/zones`, promoteId: 'id' },
      photos: { type: 'geojson', data: `${origin}/api/photos/geojson` },
    },
    layers: basemapLayers(),
  };
}
