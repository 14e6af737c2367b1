// One queryOptions factory for missions, shared by pages and invalidation.
import { queryOptions } from '@tanstack/react-query';
import { missionApi } from './api.ts';

// A mission's state (authorised, needs a new plan) changes with decisions made elsewhere (a span suspended, a zone
// drawn), so the record is read again whenever a page shows it: never an older copy kept from before the decision.
export const missionQueries = {
  all: () => ['missions'] as const,
  list: () => queryOptions({ queryKey: [...missionQueries.all(), 'list'], queryFn: missionApi.list, staleTime: 0 }),
  detail: (id: string) => queryOptions({ queryKey: [...missionQueries.all(), 'detail', id], queryFn: () => missionApi.get(id), enabled: !!id, staleTime: 0 }),
  history: (id: string) => queryOptions({ queryKey: [...missionQueries.all(), 'history', id], queryFn: () => missionApi.history(id), enabled: !!id, staleTime: 0 }),
  drones: () => queryOptions({ queryKey: ['profiles', 'drones'], queryFn: missionApi.drones, staleTime: 5 * 60_000 }),
  harvesters: () => queryOptions({ queryKey: ['profiles', 'harvesters'], queryFn: missionApi.harvesters, staleTime: 5 * 60_000 }),
  zones: () => queryOptions({ queryKey: ['zones', 'collection'], queryFn: missionApi.zones, staleTime: 60_000 }),
  lines: () => queryOptions({ queryKey: ['lines'], queryFn: missionApi.lines, staleTime: 5 * 60_000 }),
};
