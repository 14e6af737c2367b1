// Fetchers for missions (api.md "Missions"), the profiles and zones a plan needs, and the export links.
import type { FeatureCollection, Polygon } from 'geojson';
import type { DroneProfileView, HarvesterProfileView } from '#shared/schemas/assessment.ts';
import type { Line } from '#shared/schemas/inventory.ts';
import { api, ApiError } from '../../lib/api.ts';
import type { Mission, PlanRequest, PlanResult } from './types.ts';

export interface MissionHistoryEntry {
  id: string | number;
  at: string;
  actorId: string | null;
  actorName?: string | null;
  action: string;
  before?: unknown;
  after?: unknown;
}

export type ZoneCollection = FeatureCollection<Polygon, { id: string; name: string; severity: 'exclude' | 'caution'; active: boolean; reason: string }>;

const enc = encodeURIComponent;

export const missionApi = {
  plan: (body: PlanRequest) => api.post<PlanResult>('/api/missions/plan', body),
  list: async () => (await api.get<{ items: Mission[] }>('/api/missions')).items,
  get: (id: string) => api.get<Mission>(`/api/missions/${enc(id)}`),
  create: (body: PlanRequest & { name: string }) => api.post<Mission>('/api/missions', body),
  replan: (id: string, body: PlanRequest & { name?: string; version?: number }) => api.post<Mission>(`/api/missions/${enc(id)}/replan`, body),
  authorise: (id: string, version?: number) => api.post<Mission>(`/api/missions/${enc(id)}/authorise`, version === undefined ? {} : { version }),
  /** The mission's history (its audit entries); none rather than a failure where the server keeps it elsewhere. */
  history: async (id: string): Promise<MissionHistoryEntry[]> => {
    try {
      return (await api.get<{ items: MissionHistoryEntry[] }>(`/api/missions/${enc(id)}/history`)).items ?? [];
    } catch (err) {
      if (err instanceof ApiError && (err.status === 404 || err.status === 403)) return [];
      throw err;
    }
  },
  exportUrl: (id: string, format: 'gpx' | 'geojson' | 'kml') => `/api/missions/${enc(id)}/export.${format}`,
  drones: async () => (await api.get<{ items: DroneProfileView[] }>('/api/profiles/drones')).items,
  harvesters: async () => (await api.get<{ items: HarvesterProfileView[] }>('/api/profiles/harvesters')).items,
  zones: () => api.get<ZoneCollection>('/api/zones'),
  lines: async () => (await api.get<{ items: Line[] }>('/api/lines')).items,
};
