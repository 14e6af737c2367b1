// Line-inventory import: the file goes up as multipart (field `file`) to an import job, a dry run first, then
// the commit; the job's progress (rows checked, then rows saved) drives the page's bar.
import type { ImportFormat, ImportReport } from '#shared/schemas/inventory.ts';
import { api, ApiError } from '../../lib/api.ts';
import { uploadWithProgress, type UploadProgress } from './upload.ts';

export function formatOfFile(name: string): ImportFormat | null {
  const lower = name.toLowerCase();
  if (lower.endsWith('.csv')) return 'csv';
  if (lower.endsWith('.geojson') || lower.endsWith('.json')) return 'geojson';
  return null;
}

export interface ImportJobProgress {
  /** Rows checked (dry run), or rows checked then rows saved (commit). */
  done: number;
  total: number;
}

interface JobAnswer {
  job: { id: string; state: 'queued' | 'running' | 'done' | 'failed'; done: number; total: number; error: string | null };
  report: ImportReport | null;
}

const pause = (ms: number, signal?: AbortSignal) =>
  new Promise<void>((resolve, reject) => {
    const t = setTimeout(resolve, ms);
    signal?.addEventListener('abort', () => (clearTimeout(t), reject(new ApiError(0, 'aborted', 'Stopped watching the import'))), { once: true });
  });

/**
 * Sends the file up as an import job (multipart, field `file`), then follows the job's progress until it ends and
 * answers its report. A refused commit rejects with the report in the error's body (as the direct endpoint does).
 */
export async function runImport(
  step: 'dry-run' | 'commit',
  file: File,
  format: ImportFormat,
  onUpload: (p: UploadProgress) => void,
  onProgress: (p: ImportJobProgress) => void,
  signal?: AbortSignal,
): Promise<ImportReport> {
  const body = new FormData();
  body.set('format', format);
  body.set('file', file, file.name);
  const { job } = await uploadWithProgress<{ job: JobAnswer['job'] }>(`/api/import/jobs?mode=${step}`, body, onUpload, signal);
  let misses = 0;
  for (;;) {
    let answer: JobAnswer;
    try {
      answer = await api.get<JobAnswer>(`/api/import/jobs/${job.id}`);
      misses = 0;
    } catch (err) {
      // A dropped answer while the job runs on: ask again a few times before giving up.
      if (err instanceof ApiError && err.status === 0 && ++misses < 10) {
        await pause(1000, signal);
        continue;
      }
      throw err;
    }
    onProgress({ done: answer.job.done, total: answer.job.total });
    if (answer.job.state === 'done' && answer.report) return answer.report;
    if (answer.job.state === 'failed') {
      throw new ApiError(400, 'bad_request', answer.job.error ?? 'The import failed; nothing was changed.', [], answer.report ? { error: { report: answer.report } } : undefined);
    }
    await pause(300, signal);
  }
}
