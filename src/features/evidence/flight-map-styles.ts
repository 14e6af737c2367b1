// Layers of the flight-record map over /map/style.json (its `spans` tiles) and the record's own sources.
// Track in night teal on a chalk casing; perches in brass, hovers in chalk; a perch below half the prediction
// ringed in alarm red; spans a perch matched drawn in brass under the track.
import type { LayerProps } from 'react-map-gl/maplibre';

type OverlayLayer = LayerProps & { id: string };

export const FLIGHT_COLOURS = { track: '#12343b', casing: '#f7f4ee', perch: '#c98f28', hover: '#f7f4ee', low: '#b3261e', span: '#9aa5a7', matched: '#e8b04a', outline: '#12343b' } as const;

/** The first label layer of /map/style.json: lines go under it so names stay readable. */
export const LABELS_FROM = 'road-label';
/** The label font the style ships (its `font-faces`). */
const LABEL_FONT = 'Roostline Label';

export const FLIGHT_LAYER_IDS = { spans: 'flight-spans', matched: 'flight-matched-spans', casing: 'flight-track-casing', track: 'flight-track', stops: 'flight-stops', labels: 'flight-stop-labels' } as const;

export const FLIGHT_SPANS_LAYER = {
  id: FLIGHT_LAYER_IDS.spans,
  type: 'line',
  source: 'spans',
  'source-layer': 'spans',
  filter: ['==', ['get', 'status'], 'approved'],
  paint: { 'line-color': FLIGHT_COLOURS.span, 'line-width': 2 },
} as unknown as OverlayLayer;

export function matchedSpansLayer(spanIds: string[]): OverlayLayer {
  return {
    id: FLIGHT_LAYER_IDS.matched,
    type: 'line',
    source: 'spans',
    'source-layer': 'spans',
    filter: ['in', ['get', 'id'], ['literal', spanIds]],
    layout: { 'line-cap': 'round' },
    paint: { 'line-color': FLIGHT_COLOURS.matched, 'line-width': 7 },
  } as unknown as OverlayLayer;
}

export const FLIGHT_TRACK_CASING_LAYER = {
  id: FLIGHT_LAYER_IDS.casing,
  type: 'line',
  layout: { 'line-cap': 'round', 'line-join': 'round' },
  paint: { 'line-color': FLIGHT_COLOURS.casing, 'line-width': 6 },
} as unknown as OverlayLayer;

export const FLIGHT_TRACK_LAYER = {
  id: FLIGHT_LAYER_IDS.track,
  type: 'line',
  layout: { 'line-cap': 'round', 'line-join': 'round' },
  paint: { 'line-color': FLIGHT_COLOURS.track, 'line-width': 3 },
} as unknown as OverlayLayer;

export const FLIGHT_STOPS_LAYER = {
  id: FLIGHT_LAYER_IDS.stops,
  type: 'circle',
  paint: {
    'circle-radius': ['case', ['==', ['get', 'kind'], 'perch'], 9, 7],
    'circle-color': ['case', ['==', ['get', 'kind'], 'perch'], FLIGHT_COLOURS.perch, FLIGHT_COLOURS.hover],
    'circle-stroke-color': ['case', ['get', 'lowHarvest'], FLIGHT_COLOURS.low, FLIGHT_COLOURS.outline],
    'circle-stroke-width': ['case', ['get', 'lowHarvest'], 4, 2],
  },
} as unknown as OverlayLayer;

export const FLIGHT_STOP_LABELS_LAYER = {
  id: FLIGHT_LAYER_IDS.labels,
  type: 'symbol',
  layout: { 'text-field': ['get', 'label'], 'text-font': [LABEL_FONT], 'text-size': 13, 'text-offset': [0, 1.3], 'text-anchor': 'top', 'text-allow-overlap': true },
  paint: { 'text-color': FLIGHT_COLOURS.track, 'text-halo-color': FLIGHT_COLOURS.casing, 'text-halo-width': 2 },
} as unknown as OverlayLayer;
