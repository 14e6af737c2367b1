// Layers of the plan map over /map/style.json (its `zones` source) and the plan's own route source.
// Zones in the app's zone colours (exclude alarm red, caution brass); the route in night-teal ink on a chalk casing.
import type { LayerProps } from 'react-map-gl/maplibre';
import { MISSION_COLOURS } from '#shared/mission-colours.ts';

type OverlayLayer = LayerProps & { id: string };

/** The first label layer of /map/style.json: overlays go under it so names stay readable. */
export const LABELS_FROM = 'road-label';

export { MISSION_COLOURS };

export const MISSION_ZONES_FILL_LAYER = {
  id: 'mission-zones-fill',
  type: 'fill',
  source: 'zones',
  filter: ['==', ['get', 'active'], true],
  paint: {
    'fill-color': ['match', ['get', 'severity'], 'exclude', MISSION_COLOURS.exclude, MISSION_COLOURS.caution],
    'fill-opacity': 0.22,
  },
} as unknown as OverlayLayer;

export const MISSION_ZONES_OUTLINE_LAYER = {
  id: 'mission-zones-outline',
  type: 'line',
  source: 'zones',
  filter: ['==', ['get', 'active'], true],
  paint: {
    'line-color': ['match', ['get', 'severity'], 'exclude', MISSION_COLOURS.exclude, '#9c6b17'],
    'line-width': 2,
    'line-dasharray': [3, 1.5],
  },
} as unknown as OverlayLayer;

export const MISSION_ROUTE_CASING_LAYER = {
  id: 'mission-route-casing',
  type: 'line',
  filter: ['==', ['get', 'kind'], 'route'],
  layout: { 'line-cap': 'round', 'line-join': 'round' },
  paint: { 'line-color': MISSION_COLOURS.casing, 'line-width': 7 },
} as unknown as OverlayLayer;

export const MISSION_ROUTE_LAYER = {
  id: 'mission-route',
  type: 'line',
  filter: ['==', ['get', 'kind'], 'route'],
  layout: { 'line-cap': 'round', 'line-join': 'round' },
  paint: { 'line-color': MISSION_COLOURS.route, 'line-width': 3.5, 'line-dasharray': [2, 1] },
} as unknown as OverlayLayer;
