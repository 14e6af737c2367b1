// Line-inventory import: the file goes up as multipart (field `file`), a dry run first, then the commit.
import type { ImportFormat, ImportReport } from '#shared/schemas/inventory.ts';
import { uploadWithProgress, type UploadProgress } from './upload.ts';

export function formatOfFile(name: string): ImportFormat | null {
  const lower = name.toLowerCase();
  if (lower.endsWith('.csv')) return 'csv';
  if (lower.endsWith('.geojson') || lower.endsWith('.json')) return 'geojson';
  return null;
}

export async function runImport(
  step: 'dry-run' | 'commit',
  file: File,
  format: ImportFormat,
  onUpload: (p: UploadProgress) => void,
  signal?: AbortSignal,
): Promise<ImportReport> {
  const body = new FormData();
  body.set('format', format);
  body.set('file', file, file.name);
  // The server checks (or saves) the rows once the upload is complete; the page shows that phase as working.
  return uploadWithProgress<ImportReport>(`/api/import/${step}`, body, onUpload, signal);
}
