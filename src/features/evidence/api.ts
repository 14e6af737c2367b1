import type { LoadEvidenceView, LoadSeriesReport } from '#shared/schemas/load-evidence.ts';
import { api, qs } from '../../lib/api.ts';
import { uploadWithProgress, type UploadProgress } from '../../lib/upload.ts';

export interface LineSummary {
  id: string;
  name: string;
  voltageKv: number;
  frequencyHz: number;
  loadTypicalA: number;
  version: number;
}

export interface SeriesSummary {
  lineId: string;
  firstAt: string;
  lastAt: string;
  readingCount: number;
  dayCount: number;
  importedAt: string;
}

export const evidenceApi = {
  lines: () => api.get<{ items: LineSummary[] }>('/api/lines'),
  summaries: () => api.get<{ items: SeriesSummary[] }>('/api/load-series'),
  applyEstimate: (lineId: string, source: 'series' | 'flights', version: number) => api.post<LineSummary>(`/api/lines/${lineId}/load-estimate/from-evidence`, { source, version }),
  evidence: (lineId: string, month?: string) => api.get<LoadEvidenceView>(`/api/lines/${lineId}/load-evidence${qs({ month })}`),
  /** Sends the CSV as the request body: the server checks rows as they arrive, so upload progress is processing progress. */
  importSeries: (lineId: string, file: Blob, mode: 'dry-run' | 'commit', timeZone: string | undefined, onProgress?: (p: UploadProgress) => void) =>
    uploadWithProgress<LoadSeriesReport>(`/api/lines/${lineId}/load-series${qs({ mode, timeZone })}`, file, onProgress, undefined, 'text/csv'),
};

export interface PerchEventView {
  id: string;
  kind: 'perch' | 'hover';
  spanId: string | null;
  lineId: string | null;
  lineName?: string | null;
  startAt: string;
  endAt: string;
  durationS: number;
  lat: number;
  lon: number;
  spanDistanceM: number | null;
  measuredW: number | null;
  predictedW: number | null;
  predictedSource: 'series' | 'estimate' | null;
  lineCurrentA: number | null;
  impliedCurrentA: number | null;
  meteredCurrentA: number | null;
  batteryStartPct: number | null;
  batteryEndPct: number | null;
  note: string | null;
  ratio: number | null;
  lowHarvest: boolean;
  /** "VR138-089 → VR138-090" on a flight record's events; absent on the perch list. */
  spanLabel?: string | null;
}

export interface FlightRecordSummary {
  id: string;
  fileName: string;
  format: 'csv' | 'gpx';
  missionId: string | null;
  spanId: string | null;
  startedAt: string;
  endedAt: string;
  pointCount: number;
  uploadedAt: string;
}

export interface FlightRecordView {
  id: string;
  fileName: string;
  format: 'csv' | 'gpx';
  startedAt: string;
  endedAt: string;
  pointCount: number;
  missionId: string | null;
  spanId: string | null;
  track: [number, number][];
  events: PerchEventView[];
}

export const flightApi = {
  upload: (file: File, onProgress?: (p: UploadProgress) => void, fields: { missionId?: string; spanId?: string } = {}) => {
    const body = new FormData();
    body.append('file', file);
    for (const [k, v] of Object.entries(fields)) if (v) body.append(k, v);
    return uploadWithProgress<FlightRecordView>('/api/flight-records', body, onProgress);
  },
  perches: () => api.get<{ items: PerchEventView[]; lowHarvestSpanIds: string[] }>('/api/evidence/perches'),
  get: (id: string) => api.get<FlightRecordView>(`/api/flight-records/${encodeURIComponent(id)}`),
  list: (filter: { missionId?: string } = {}) => api.get<{ items: FlightRecordSummary[] }>(`/api/flight-records${qs(filter)}`),
  ofSpan: (spanId: string) => api.get<SpanEvidenceView>(`/api/evidence/spans/${encodeURIComponent(spanId)}`),
};

/** What the fleet measured on one span (`GET /api/evidence/spans/:id`). */
export interface SpanEvidenceView {
  spanId: string;
  lineId: string;
  threshold: number;
  perchCount: number;
  measuredCount: number;
  lowHarvestCount: number;
  lowHarvest: boolean;
  medianRatio: number | null;
  latest: {
    flightRecordId: string;
    startAt: string;
    measuredW: number | null;
    predictedW: number | null;
    predictedSource: 'series' | 'estimate' | null;
    ratio: number | null;
    lowHarvest: boolean;
  } | null;
}
