// Photo API calls. Uploads go through XMLHttpRequest: fetch has no upload progress events.
import type { ApiErrorBody } from '#shared/api-error.ts';
import { api, ApiError, qs } from '../../lib/api.ts';
import type { Photo, PhotoWithSuggestions } from './types.ts';

export const photoApi = {
  list: (params: { spanId?: string; hazardId?: string; unplaced?: boolean }) => api.get<{ items: Photo[] }>(`/api/photos${qs(params)}`),
  get: (id: string) => api.get<PhotoWithSuggestions>(`/api/photos/${encodeURIComponent(id)}`),
  /** Confirms a span/hazard link (null unlinks) or places the photo by hand. */
  update: (id: string, body: { spanId?: string | null; hazardId?: string | null; lat?: number | null; lon?: number | null }) =>
    api.patch<PhotoWithSuggestions>(`/api/photos/${encodeURIComponent(id)}`, body),
  remove: (id: string) => api.delete<void>(`/api/photos/${encodeURIComponent(id)}`),
  geojsonUrl: (params: { spanId?: string; bbox?: string } = {}) => `/api/photos/geojson${qs(params)}`,
};

export interface UploadHandle {
  promise: Promise<PhotoWithSuggestions>;
  abort: () => void;
}

/** POST /api/photos with one file; `onProgress` gets 0…1 as the bytes go out. */
export function uploadPhoto(file: Blob, opts: { spanId?: string | null; fileName?: string; idempotencyKey?: string; onProgress?: (fraction: number) => void }): UploadHandle {
  const xhr = new XMLHttpRequest();
  const promise = new Promise<PhotoWithSuggestions>((resolve, reject) => {
    const body = new FormData();
    body.append('photo', file, opts.fileName ?? (file instanceof File ? file.name : 'photo'));
    if (opts.spanId) body.append('spanId', opts.spanId);
    xhr.open('POST', '/api/photos');
    xhr.responseType = 'text';
    xhr.withCredentials = true;
    if (opts.idempotencyKey) xhr.setRequestHeader('Idempotency-Key', opts.idempotencyKey);
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable && e.total > 0) opts.onProgress?.(e.loaded / e.total);
    };
    xhr.onload = () => {
      let data: unknown = null;
      try {
        data = JSON.parse(xhr.responseText);
      } catch {
        /* not JSON */
      }
      if (xhr.status === 201) return resolve(data as PhotoWithSuggestions);
      const err = (data as ApiErrorBody | null)?.error;
      reject(new ApiError(xhr.status, err?.code ?? 'unknown', err?.message ?? `Upload failed (${xhr.status})`, err?.issues, data));
    };
    xhr.onerror = () => reject(new ApiError(0, 'network', 'The connection dropped during the upload'));
    xhr.onabort = () => reject(new ApiError(0, 'aborted', 'Upload cancelled'));
    xhr.send(body);
  });
  return { promise, abort: () => xhr.abort() };
}
