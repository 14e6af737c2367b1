// Web Mercator tile arithmetic (the XYZ scheme of the basemap and span tiles): which tiles cover a box, and the
// edges of a tile. Shared by the basemap generator, the span tiles and the offline-area download.

/** A box in WGS84 degrees, [west, south, east, north]. */
export type LonLatBox = [number, number, number, number];

/** Web Mercator's latitude limit; tiles end there. */
const MAX_LAT = 85.0511287798066;

/** Column of the tile holding `lon` at zoom `z`. */
export function lonToTileX(lon: number, z: number): number {
  const n = 2 ** z;
  return Math.min(n - 1, Math.max(0, Math.floor(((lon + 180) / 360) * n)));
}

/** Row of the tile holding `lat` at zoom `z` (row 0 at the top). */
export function latToTileY(lat: number, z: number): number {
  const n = 2 ** z;
  const r = (Math.max(-MAX_LAT, Math.min(MAX_LAT, lat)) * Math.PI) / 180;
  return Math.min(n - 1, Math.max(0, Math.floor(((1 - Math.log(Math.tan(r) + 1 / Math.cos(r)) / Math.PI) / 2) * n)));
}

/** Longitude of the west edge of tile column `x`. */
export function tileLon(x: number, z: number): number {
  return (x / 2 ** z) * 360 - 180;
}

/** Latitude of the north edge of tile row `y`. */
export function tileLat(y: number, z: number): number {
  const n = Math.PI - (2 * Math.PI * y) / 2 ** z;
  return (180 / Math.PI) * Math.atan(0.5 * (Math.exp(n) - Math.exp(-n)));
}

/** The tile range covering a box at one zoom (inclusive), and how many tiles that is. */
export function tileRange(box: LonLatBox, z: number) {
  const [west, south, east, north] = box;
  const xMin = lonToTileX(west, z);
  const xMax = lonToTileX(east, z);
  const yMin = latToTileY(north, z);
  const yMax = latToTileY(south, z);
  return { z, xMin, xMax, yMin, yMax, count: (xMax - xMin + 1) * (yMax - yMin + 1) };
}

/** Tile counts per zoom for a box over a zoom range (inclusive). */
export function tileCounts(box: LonLatBox, minZoom: number, maxZoom: number) {
  const out: { z: number; count: number }[] = [];
  for (let z = minZoom; z <= maxZoom; z++) out.push({ z, count: tileRange(box, z).count });
  return out;
}

/** Every tile of a box over a zoom range, lowest zoom first. */
export function* tilesIn(box: LonLatBox, minZoom: number, maxZoom: number): Generator<{ z: number; x: number; y: number }> {
  for (let z = minZoom; z <= maxZoom; z++) {
    const r = tileRange(box, z);
    for (let x = r.xMin; x <= r.xMax; x++) for (let y = r.yMin; y <= r.yMax; y++) yield { z, x, y };
  }
}
