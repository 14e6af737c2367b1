// Fetchers for the map: zones (api.md "No-perch zones"), the filtered spans' box, harvester and drone profiles.
import type { Feature, FeatureCollection, Polygon } from 'geojson';
import { api, qs } from '../../lib/api.ts';
import type { MapFilters } from './map-filters.ts';

export interface ZoneProperties {
  id: string;
  name: string;
  reason: string;
  severity: 'exclude' | 'caution';
  validFrom: string | null;
  validTo: string | null;
  active: boolean;
  version: number;
  createdAt: string;
  updatedAt: string;
}
export type ZoneFeature = Feature<Polygon, ZoneProperties>;

export interface ZoneInput {
  name: string;
  reason: string;
  severity: 'exclude' | 'caution';
  geometry: Polygon;
  validFrom: string | null;
  validTo: string | null;
}

export interface ProfileSummary {
  id: string;
  name: string;
  active: boolean;
}

export const mapApi = {
  zones: () => api.get<FeatureCollection<Polygon, ZoneProperties>>('/api/zones'),
  createZone: (body: ZoneInput) => api.post<ZoneFeature>('/api/zones', body),
  updateZone: (id: string, body: Partial<ZoneInput> & { version: number }) => api.patch<ZoneFeature>(`/api/zones/${encodeURIComponent(id)}`, body),
  deleteZone: (id: string, version: number) => api.delete<void>(`/api/zones/${encodeURIComponent(id)}${qs({ version })}`),
  spanBounds: (f: MapFilters, droneProfileId?: string) =>
    api.get<{ count: number; bbox: [number, number, number, number] | null }>(
      `/api/map/span-bounds${qs({ status: f.status, lineId: f.lineId, minHarvestW: f.minHarvestW, minScore: f.minScore, harvesterProfileId: f.harvesterProfileId && droneProfileId ? f.harvesterProfileId : undefined, droneProfileId: f.harvesterProfileId ? droneProfileId : undefined })}`,
    ),
  harvesters: () => api.get<{ items: ProfileSummary[] }>('/api/profiles/harvesters'),
  drones: () => api.get<{ items: ProfileSummary[] }>('/api/profiles/drones'),
};
