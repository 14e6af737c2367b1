// File upload with progress: fetch() cannot report upload progress, XMLHttpRequest can.
import type { ApiErrorBody } from '#shared/api-error.ts';
import { ApiError, noteAnswer } from './api.ts';

export interface UploadProgress {
  loaded: number;
  total: number;
  /** 0..1, or null while the browser does not know the total. */
  fraction: number | null;
}

export function uploadWithProgress<T>(url: string, body: FormData | Blob, onProgress?: (p: UploadProgress) => void, signal?: AbortSignal, contentType?: string): Promise<T> {
  return new Promise<T>((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', url);
    xhr.withCredentials = true;
    if (contentType) xhr.setRequestHeader('Content-Type', contentType);
    xhr.responseType = 'text';
    xhr.upload.onprogress = (e) => onProgress?.({ loaded: e.loaded, total: e.total, fraction: e.lengthComputable && e.total > 0 ? e.loaded / e.total : null });
    xhr.onload = () => {
      let data: unknown = null;
      try {
        data = xhr.responseText ? JSON.parse(xhr.responseText) : null;
      } catch {
        data = null;
      }
      if (xhr.status >= 200 && xhr.status < 300) return resolve(data as T);
      noteAnswer(url, xhr.status);
      const err = (data as ApiErrorBody | null)?.error;
      reject(new ApiError(xhr.status, err?.code ?? 'unknown', err?.message ?? `Upload failed (${xhr.status})`, err?.issues, data));
    };
    xhr.onerror = () => reject(new ApiError(0, 'network', 'The upload did not reach the server. Check the connection and try again.'));
    xhr.onabort = () => reject(new ApiError(0, 'aborted', 'Upload cancelled'));
    signal?.addEventListener('abort', () => xhr.abort(), { once: true });
    xhr.send(body);
  });
}
