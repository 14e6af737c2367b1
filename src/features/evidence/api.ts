import type { LoadEvidenceView, LoadSeriesReport } from '#shared/schemas/load-evidence.ts';
import { api, qs } from '../../lib/api.ts';
import { uploadWithProgress, type UploadProgress } from '../../lib/upload.ts';

export interface LineSummary {
  id: string;
  name: string;
  voltageKv: number;
  frequencyHz: number;
  loadTypicalA: number;
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
  evidence: (lineId: string, month?: string) => api.get<LoadEvidenceView>(`/api/lines/${lineId}/load-evidence${qs({ month })}`),
  /** Sends the CSV as the request body: the server checks rows as they arrive, so upload progress is processing progress. */
  importSeries: (lineId: string, file: Blob, mode: 'dry-run' | 'commit', timeZone: string | undefined, onProgress?: (p: UploadProgress) => void) =>
    uploadWithProgress<LoadSeriesReport>(`/api/lines/${lineId}/load-series${qs({ mode, timeZone })}`, file, onProgress, undefined, 'text/csv'),
};
