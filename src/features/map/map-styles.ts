// Overlay layers of the map (spans, structures, zones, photos) over the sources that /map/style.json declares.
// Roostline's own palette: status colours follow the app's theme (brass, go, alarm, ink), the score runs
// from alarm red through brass to green.
import type { LayerProps } from 'react-map-gl/maplibre';

/** A layer for react-map-gl's <Layer>, over a source of /map/style.json. */
export type OverlayLayer = LayerProps & { id: string };
import { SPAN_STATUS_COLOURS } from '#shared/span-status-colours.ts';

/** The status palette, shared with the KML export. */
export const STATUS_COLOURS = SPAN_STATUS_COLOURS;

/** Score stops (0..100) and their colours; spans with no assessment are drawn in NO_SCORE_COLOUR. */
export const SCORE_STOPS: [number, string][] = [
  [0, '#b3261e'],
  [40, '#e07b24'],
  [60, '#e8b04a'],
  [80, '#2e7d4f'],
];
export const NO_SCORE_COLOUR = '#98a4a6';

/** Harvest power (W) → line width (px): thin when little power is there to harvest. */
export const HARVEST_WIDTH_STOPS: [number, number][] = [
  [0, 2],
  [2, 3.5],
  [10, 6],
  [30, 9],
];

export const ZONE_COLOURS = { exclude: '#b3261e', caution: '#e8b04a' } as const;

/** An approved span whose assessment now fails a blocking gate: drawn thin and in this colour, never as a good candidate. */
export const FAILS_GATE_COLOUR = '#7a2a24';
const failsGate = ['all', ['==', ['get', 'status'], 'approved'], ['==', ['get', 'perchable'], false]];
const statusColour = ['case', failsGate, FAILS_GATE_COLOUR, ['match', ['get', 'status'], ...Object.entries(STATUS_COLOURS).flat(), NO_SCORE_COLOUR]];
const scoreColour = ['case', failsGate, FAILS_GATE_COLOUR, ['has', 'score'], ['interpolate', ['linear'], ['get', 'score'], ...SCORE_STOPS.flat()], NO_SCORE_COLOUR];
const harvestWidth = ['case', failsGate, HARVEST_WIDTH_STOPS[0][1], ['interpolate', ['linear'], ['coalesce', ['get', 'harvestW'], 0], ...HARVEST_WIDTH_STOPS.flat()]];
const zoomedWidth = (w: unknown, casing = 0) => ['interpolate', ['linear'], ['zoom'], 9, ['*', 0.5, ['+', w, casing]], 14, ['+', w, casing], 17, ['*', 1.6, ['+', w, casing]]];

export const LAYER_IDS = {
  zonesFill: 'zones-fill',
  zonesOutline: 'zones-outline',
  spansCasing: 'spans-casing',
  spansLine: 'spans-line',
  spansSelected: 'spans-selected',
  structures: 'structures',
  photos: 'photos',
} as const;

export const ZONES_FILL_LAYER = {
  id: LAYER_IDS.zonesFill,
  type: 'fill',
  source: 'zones',
  paint: {
    'fill-color': ['match', ['get', 'severity'], 'exclude', ZONE_COLOURS.exclude, ZONE_COLOURS.caution],
    'fill-opacity': ['case', ['get', 'active'], 0.22, 0.08],
  },
} as unknown as OverlayLayer;

export const ZONES_OUTLINE_LAYER = {
  id: LAYER_IDS.zonesOutline,
  type: 'line',
  source: 'zones',
  paint: {
    'line-color': ['match', ['get', 'severity'], 'exclude', ZONE_COLOURS.exclude, '#9c6b17'],
    'line-width': 2.5,
    'line-dasharray': [3, 1.5],
  },
} as unknown as OverlayLayer;

export const SPANS_CASING_LAYER = {
  id: LAYER_IDS.spansCasing,
  type: 'line',
  source: 'spans',
  'source-layer': 'spans',
  layout: { 'line-cap': 'round', 'line-join': 'round' },
  paint: { 'line-color': '#f7f4ee', 'line-width': zoomedWidth(harvestWidth, 3), 'line-opacity': 0.9 },
} as unknown as OverlayLayer;

/** The span line, coloured by status or by score (see spanLinePaint). */
export function spanLineLayer(colourBy: 'status' | 'score'): OverlayLayer {
  return {
    id: LAYER_IDS.spansLine,
    type: 'line',
    source: 'spans',
    'source-layer': 'spans',
    layout: { 'line-cap': 'round', 'line-join': 'round' },
    paint: {
      'line-color': (colourBy === 'score' ? scoreColour : statusColour) as never,
      'line-width': zoomedWidth(harvestWidth) as never,
    },
  } as unknown as OverlayLayer;
}

export const SPANS_SELECTED_LAYER = {
  id: LAYER_IDS.spansSelected,
  type: 'line',
  source: 'spans',
  'source-layer': 'spans',
  filter: ['==', ['get', 'id'], ''],
  layout: { 'line-cap': 'round' },
  paint: { 'line-color': '#12343b', 'line-width': zoomedWidth(harvestWidth, 6), 'line-opacity': 0.45 },
} as unknown as OverlayLayer;

export const STRUCTURES_LAYER = {
  id: LAYER_IDS.structures,
  type: 'circle',
  source: 'spans',
  'source-layer': 'structures',
  minzoom: 13,
  paint: {
    'circle-radius': ['interpolate', ['linear'], ['zoom'], 13, 2.5, 17, 6],
    'circle-color': '#ffffff',
    'circle-stroke-color': '#12343b',
    'circle-stroke-width': ['match', ['get', 'kind'], 'tower', 2.5, 1.5],
  },
} as unknown as OverlayLayer;

export const PHOTOS_LAYER = {
  id: LAYER_IDS.photos,
  type: 'symbol',
  source: 'photos',
  minzoom: 12,
  layout: { 'icon-image': 'photo', 'icon-size': ['interpolate', ['linear'], ['zoom'], 12, 0.6, 16, 1], 'icon-allow-overlap': true },
} as unknown as OverlayLayer;
