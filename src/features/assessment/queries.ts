// Span assessment reads: every stored harvester × drone pair of a span, and the harvest curves for its charts.
import { queryOptions } from '@tanstack/react-query';
import type { HarvestCurveView, HarvesterProfileView, SpanAssessmentView } from '#shared/schemas/assessment.ts';
import { api, qs } from '../../lib/api.ts';

export interface SpanAssessmentPair extends SpanAssessmentView {
  harvesterName: string;
  droneName: string;
}

export const assessmentQueries = {
  all: () => ['assessment'] as const,
  ofSpan: (spanId: string) =>
    queryOptions({
      queryKey: [...assessmentQueries.all(), 'span', spanId],
      queryFn: async () => (await api.get<{ items: SpanAssessmentPair[] }>(`/api/spans/${encodeURIComponent(spanId)}/assessments`)).items,
      // Span edits elsewhere recompute it: always refetch when the panel mounts.
      staleTime: 0,
    }),
  curve: (spanId: string, harvesterId: string | undefined) =>
    queryOptions({
      queryKey: [...assessmentQueries.all(), 'curve', spanId, harvesterId ?? 'default'],
      queryFn: () => api.get<HarvestCurveView>(`/api/spans/${encodeURIComponent(spanId)}/harvest-curve${qs({ harvesterId })}`),
      staleTime: 0,
    }),
  harvesters: () =>
    queryOptions({
      queryKey: [...assessmentQueries.all(), 'harvesters'],
      queryFn: async () => (await api.get<{ items: HarvesterProfileView[] }>('/api/profiles/harvesters')).items,
      staleTime: 60_000,
    }),
};

export const GATE_LABELS: Record<string, string> = {
  'gripper-fit': 'Gripper fits the conductor',
  'contact-temperature': 'Conductor below the contact limit at peak load',
  clearance: 'Ground clearance meets code and drone',
  'no-perch-zone': 'Outside every active no-perch zone',
  ampacity: 'Load estimate within the ampacity (data check)',
  'useful-harvest': 'Harvest reaches the useful minimum',
};

export const FACTOR_LABELS: Record<string, string> = {
  'power-margin': 'Power margin',
  'clearance-margin': 'Clearance margin',
  hazards: 'Hazards',
  'span-exposure': 'Span length & exposure',
  'data-quality': 'Data completeness & age',
};
