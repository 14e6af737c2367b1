// The invented demo region "Harrow Vale": a box on an empty stretch of open ocean, so that no real
// geography is implied. The demo seed (lines, structures, spans) and the basemap generator both use it.

/** Bounding box of the demo region, WGS84 degrees. */
export const DEMO_BBOX = { west: -130.6, south: -30.4, east: -130.0, north: -30.0 } as const;

/** Centre of the demo region, [lon, lat]. */
export const DEMO_CENTER: [number, number] = [-130.3, -30.2];

export interface DemoTown {
  /** Stable slug. */
  id: string;
  /** Invented place name. */
  name: string;
  lon: number;
  lat: number;
  /** 'town' is labelled from lower zooms than 'village'. */
  kind: 'town' | 'village';
}

/** Invented towns of Harrow Vale. */
export const DEMO_TOWNS: DemoTown[] = [
  { id: 'wendlecross', name: 'Wendlecross', lon: -130.3, lat: -30.19, kind: 'town' },
  { id: 'skelloway-end', name: 'Skelloway End', lon: -130.5, lat: -30.08, kind: 'town' },
  { id: 'pellowby', name: 'Pellowby', lon: -130.11, lat: -30.31, kind: 'town' },
  { id: 'ostlemere', name: 'Ostlemere', lon: -130.46, lat: -30.33, kind: 'village' },
  { id: 'thrumbeck-green', name: 'Thrumbeck Green', lon: -130.16, lat: -30.07, kind: 'village' },
  { id: 'quarnock-halt', name: 'Quarnock Halt', lon: -130.33, lat: -30.36, kind: 'village' },
];
