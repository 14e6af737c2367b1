// Line-inventory import: the file goes up as multipart (field `file`), a dry run first, then the commit.
import type { ImportFormat, ImportReport } from '#shared/schemas/inventory.ts';
import { api } from '../../lib/api.ts';
import { uploadWithProgress, type UploadProgress } from './upload.ts';

export function formatOfFile(name: string): ImportFormat | null {
  const lower = name.toLowerCase();
  if (lower.endsWith('.csv')) return 'csv';
  if (lower.endsWith('.geojson') || lower.endsWith('.json')) return 'geojson';
  return null;
}

/** A long import may answer with a background job instead of the report; then the report comes with the finished job. */
interface JobAnswer {
  job: { id: string };
}
interface JobState {
  id: string;
  state: 'queued' | 'running' | 'done' | 'failed';
  done: number;
  total: number;
  error: string | null;
  result?: ImportReport;
}

export interface ProcessingProgress {
  done: number;
  total: number;
}

export async function runImport(
  step: 'dry-run' | 'commit',
  file: File,
  format: ImportFormat,
  onUpload: (p: UploadProgress) => void,
  onProcessing: (p: ProcessingProgress | null) => void,
  signal?: AbortSignal,
): Promise<ImportReport> {
  const body = new FormData();
  body.set('format', format);
  body.set('file', file, file.name);
  const answer = await uploadWithProgress<ImportReport | JobAnswer>(`/api/import/${step}`, body, onUpload, signal);
  onProcessing(null);
  if (!('job' in answer)) return answer;
  for (;;) {
    if (signal?.aborted) throw new Error('Import cancelled');
    const job = await api.get<JobState>(`/api/jobs/${encodeURIComponent(answer.job.id)}`);
    onProcessing({ done: job.done, total: job.total });
    if (job.state === 'done' && job.result) return job.result;
    if (job.state === 'failed') throw new Error(job.error ?? 'The import failed on the server; nothing was changed.');
    await new Promise((r) => setTimeout(r, 400));
  }
}
