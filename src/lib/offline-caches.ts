// Cache Storage names shared by the service worker's routes (vite.config.ts) and the offline-area download, so a
// tile or thumbnail the download stores is the one the worker answers with no signal.
export const CACHE_BASEMAP_TILES = 'roostline-basemap-tiles';
export const CACHE_SPAN_TILES = 'roostline-span-tiles';
export const CACHE_PHOTOS = 'roostline-photos';
/** The map's GeoJSON sources (zones, photo points), read by the map library itself. */
export const CACHE_MAP_DATA = 'roostline-map-data';
