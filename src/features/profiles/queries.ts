// Equipment profiles, bench tests, scoring settings and rescore jobs: fetchers and query factories.
import { queryOptions } from '@tanstack/react-query';
import type {
  BenchTestCreateInput,
  BenchTestView,
  DroneProfileCreateInput,
  DroneProfileView,
  FitGapResult,
  HarvesterProfileCreateInput,
  HarvesterProfileView,
  JobView,
  ScoringSettingsInput,
  ScoringSettingsView,
} from '#shared/schemas/assessment.ts';
import { api } from '../../lib/api.ts';

type WithJob<T> = T & { rescoreJobId: string | null };

export const profileApi = {
  harvesters: async () => (await api.get<{ items: HarvesterProfileView[] }>('/api/profiles/harvesters')).items,
  drones: async () => (await api.get<{ items: DroneProfileView[] }>('/api/profiles/drones')).items,
  createHarvester: (body: HarvesterProfileCreateInput) => api.post<WithJob<HarvesterProfileView>>('/api/profiles/harvesters', body),
  updateHarvester: (id: string, body: Partial<HarvesterProfileCreateInput> & { version: number }) => api.patch<WithJob<HarvesterProfileView>>(`/api/profiles/harvesters/${id}`, body),
  deleteHarvester: (id: string) => api.delete<void>(`/api/profiles/harvesters/${id}`),
  createDrone: (body: DroneProfileCreateInput) => api.post<WithJob<DroneProfileView>>('/api/profiles/drones', body),
  updateDrone: (id: string, body: Partial<DroneProfileCreateInput> & { version: number }) => api.patch<WithJob<DroneProfileView>>(`/api/profiles/drones/${id}`, body),
  deleteDrone: (id: string) => api.delete<void>(`/api/profiles/drones/${id}`),
  benchTests: async (harvesterId: string) => (await api.get<{ items: BenchTestView[] }>(`/api/profiles/harvesters/${harvesterId}/bench-tests`)).items,
  addBenchTest: (harvesterId: string, body: BenchTestCreateInput) => api.post<BenchTestView>(`/api/profiles/harvesters/${harvesterId}/bench-tests`, body),
  deleteBenchTest: (harvesterId: string, id: string) => api.delete<void>(`/api/profiles/harvesters/${harvesterId}/bench-tests/${id}`),
  fitGap: (harvesterId: string, body: { apply: boolean; version?: number }) => api.post<WithJob<FitGapResult>>(`/api/profiles/harvesters/${harvesterId}/fit-gap`, body),
  settings: () => api.get<ScoringSettingsView>('/api/settings/scoring'),
  saveSettings: (version: number, settings: ScoringSettingsInput) => api.put<WithJob<ScoringSettingsView>>('/api/settings/scoring', { version, settings }),
  job: (id: string) => api.get<JobView>(`/api/jobs/${id}`),
};

export const profileQueries = {
  all: () => ['profiles'] as const,
  harvesters: () => queryOptions({ queryKey: [...profileQueries.all(), 'harvesters'], queryFn: profileApi.harvesters }),
  drones: () => queryOptions({ queryKey: [...profileQueries.all(), 'drones'], queryFn: profileApi.drones }),
  benchTests: (harvesterId: string) => queryOptions({ queryKey: [...profileQueries.all(), 'bench', harvesterId], queryFn: () => profileApi.benchTests(harvesterId), enabled: !!harvesterId }),
  settings: () => queryOptions({ queryKey: ['scoring-settings'], queryFn: profileApi.settings }),
  job: (id: string | null) =>
    queryOptions({
      queryKey: ['jobs', id],
      queryFn: () => profileApi.job(id!),
      enabled: !!id,
      // Poll while the job runs.
      refetchInterval: (q) => (q.state.data && (q.state.data.state === 'done' || q.state.data.state === 'failed') ? false : 400),
    }),
};
