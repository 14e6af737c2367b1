// Fetchers for a line and its owner's permissions (api.md "Line permissions"); the document goes up as multipart.
import { queryOptions } from '@tanstack/react-query';
import type { Line } from '#shared/schemas/inventory.ts';
import type { LinePermissionView as LinePermission, LinePermissionInput as SharedInput } from '#shared/schemas/line-permissions.ts';
import { api } from '../../lib/api.ts';
import { uploadWithProgress, type UploadProgress } from '../../lib/upload.ts';

export type { LinePermissionView as LinePermission } from '#shared/schemas/line-permissions.ts';

/** The form's values; the server's schema (shared/schemas/line-permissions.ts) checks them again. */
export type LinePermissionInput = Required<SharedInput>;

const enc = encodeURIComponent;

export const lineApi = {
  lines: async () => (await api.get<{ items: Line[] }>('/api/lines')).items,
  line: (id: string) => api.get<Line>(`/api/lines/${enc(id)}`),
  permissions: async (id: string) => (await api.get<{ items: LinePermission[] }>(`/api/lines/${enc(id)}/permissions`)).items,
  addPermission: (id: string, body: LinePermissionInput) => api.post<LinePermission>(`/api/lines/${enc(id)}/permissions`, body),
  /** The owner's document (PDF or image) for a permission, through the photo storage. */
  uploadDocument: (lineId: string, permissionId: string, file: File, onProgress?: (p: UploadProgress) => void) => {
    const form = new FormData();
    form.append('document', file);
    return uploadWithProgress<LinePermission>(`/api/lines/${enc(lineId)}/permissions/${enc(permissionId)}/document`, form, onProgress);
  },
};

export const lineQueries = {
  lines: () => queryOptions({ queryKey: ['lines'], queryFn: lineApi.lines, staleTime: 5 * 60_000 }),
  line: (id: string) => queryOptions({ queryKey: ['lines', 'detail', id], queryFn: () => lineApi.line(id) }),
  permissions: (id: string) => queryOptions({ queryKey: ['lines', id, 'permissions'], queryFn: () => lineApi.permissions(id) }),
};

/** Expired when the server says so, else when today (UTC, as the server's zones count whole days) is past validTo. */
export function isExpired(p: Pick<LinePermission, 'validTo'> & { expired?: boolean }, today = new Date().toISOString().slice(0, 10)): boolean {
  return p.expired ?? p.validTo < today;
}

/** Not yet valid: today is before validFrom. */
export function isNotYetValid(p: Pick<LinePermission, 'validFrom'>, today = new Date().toISOString().slice(0, 10)): boolean {
  return p.validFrom > today;
}
