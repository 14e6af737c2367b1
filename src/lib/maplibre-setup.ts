// MapLibre's one-time set-up for every map of the app: the worker shipped with the app (no CDN) and the PMTiles
// protocol the basemap is read through. Importing this module does it, once.
import 'maplibre-gl/dist/maplibre-gl.css';
import { addProtocol, setWorkerUrl } from 'maplibre-gl';
import workerUrl from 'maplibre-gl/dist/maplibre-gl-worker.mjs?url';
import { Protocol } from 'pmtiles';

setWorkerUrl(workerUrl);
const w = globalThis as { __roostlinePmtiles?: boolean };
if (!w.__roostlinePmtiles) {
  addProtocol('pmtiles', new Protocol().tile);
  w.__roostlinePmtiles = true;
}
