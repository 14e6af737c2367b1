// Small measuring helpers the benches share.

/** The p-th percentile of a list of figures (nearest rank). */
export const pct = (list: number[], p: number) => [...list].sort((a, b) => a - b)[Math.min(list.length - 1, Math.floor((p / 100) * list.length))];

/** The web-Mercator tile holding a position at zoom z. */
export function tileOf(lon: number, lat: number, z: number) {
  const r = (lat * Math.PI) / 180;
  return { x: Math.floor(((lon + 180) / 360) * 2 ** z), y: Math.floor(((1 - Math.log(Math.tan(r) + 1 / Math.cos(r)) / Math.PI) / 2) * 2 ** z) };
}

/** Latencies of `total` calls made by `clients` concurrent callers. */
export async function concurrent(clients: number, total: number, call: (i: number) => Promise<unknown>) {
  const times: number[] = [];
  let next = 0;
  await Promise.all(
    Array.from({ length: clients }, async () => {
      while (next < total) {
        const i = next++;
        const t = performance.now();
        await call(i);
        times.push(performance.now() - t);
      }
    }),
  );
  return times;
}
