// The map's filters in the URL. The names are the spans table's (status, lineId, minHarvestW, minScore), so a link
// moves between the map and the table with the same filters; other parameters of the URL are left alone.
import { isSpanStatus, type SpanStatus } from '../spans/status.ts';

export type ColourBy = 'status' | 'score';

export interface MapFilters {
  status?: SpanStatus;
  lineId?: string;
  minHarvestW?: number;
  minScore?: number;
  /** Harvester profile whose harvest power the tiles carry; omitted = the default profile. */
  harvesterProfileId?: string;
  colourBy: ColourBy;
}

function nonNegative(raw: string | null): number | undefined {
  if (raw === null || raw.trim() === '') return undefined;
  const n = Number(raw);
  return Number.isFinite(n) && n >= 0 ? n : undefined;
}

function text(raw: string | null): string | undefined {
  const t = raw?.trim();
  return t ? t.slice(0, 200) : undefined;
}

export function mapFiltersFromSearch(params: URLSearchParams): MapFilters {
  const status = params.get('status');
  return {
    status: status && isSpanStatus(status) ? status : undefined,
    lineId: text(params.get('lineId')),
    minHarvestW: nonNegative(params.get('minHarvestW')),
    minScore: nonNegative(params.get('minScore')),
    harvesterProfileId: text(params.get('harvesterProfileId')),
    colourBy: params.get('colour') === 'score' ? 'score' : 'status',
  };
}

/** Writes the filters into a copy of `params`, dropping the unset ones. */
export function searchWithMapFilters(params: URLSearchParams, f: MapFilters): URLSearchParams {
  const p = new URLSearchParams(params);
  const set = (key: string, value: string | number | undefined) => (value === undefined || value === '' ? p.delete(key) : p.set(key, String(value)));
  set('status', f.status);
  set('lineId', f.lineId);
  set('minHarvestW', f.minHarvestW);
  set('minScore', f.minScore);
  set('harvesterProfileId', f.harvesterProfileId);
  set('colour', f.colourBy === 'score' ? 'score' : undefined);
  p.delete('page');
  return p;
}

/** The same filters as the spans table link (no map-only parameters). */
export function spansTableLink(f: MapFilters): string {
  const p = new URLSearchParams();
  if (f.status) p.set('status', f.status);
  if (f.lineId) p.set('lineId', f.lineId);
  if (f.minHarvestW !== undefined) p.set('minHarvestW', String(f.minHarvestW));
  if (f.minScore !== undefined) p.set('minScore', String(f.minScore));
  const s = p.toString();
  return `/spans${s ? `?${s}` : ''}`;
}

/** A MapLibre filter expression over the tile properties for the span layers. */
export function spanFilterExpression(f: MapFilters): unknown[] {
  const all: unknown[] = ['all'];
  if (f.status) all.push(['==', ['get', 'status'], f.status]);
  if (f.lineId) all.push(['==', ['get', 'lineId'], f.lineId]);
  if (f.minHarvestW !== undefined) all.push(['>=', ['coalesce', ['get', 'harvestW'], -1], f.minHarvestW]);
  if (f.minScore !== undefined) all.push(['>=', ['coalesce', ['get', 'score'], -1], f.minScore]);
  return all;
}
