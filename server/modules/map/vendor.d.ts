// vt-pbf ships no types: the part of its API the map uses.
declare module 'vt-pbf' {
  interface GeojsonVtLayer {
    features: unknown[];
  }
  export function fromGeojsonVt(layers: Record<string, GeojsonVtLayer>, options?: { version?: number; extent?: number }): Uint8Array;
  const vtpbf: { fromGeojsonVt: typeof fromGeojsonVt };
  export default vtpbf;
}
