// Fetchers for the span records (api.md "Lines and structures", "Spans"); SI units on the wire.
import { api, ApiError, qs } from '../../lib/api.ts';
import type { SpanListQuery } from './table-url-state.ts';
import type { AuditEntryView, ConductorCatalogueEntry, HazardKind, Line, Page, Span, Structure } from './types.ts';

export const spanApi = {
  list: (q: SpanListQuery) => api.get<Page<Span>>(`/api/spans${qs({ ...q })}`),
  get: (id: string) => api.get<Span>(`/api/spans/${encodeURIComponent(id)}`),
  create: (body: unknown) => api.post<Span>('/api/spans', body),
  update: (id: string, body: unknown) => api.patch<Span>(`/api/spans/${encodeURIComponent(id)}`, body),
  submit: (id: string, version?: number) => api.post<Span>(`/api/spans/${encodeURIComponent(id)}/submit`, { version }),
  approve: (id: string, version: number) => api.post<Span>(`/api/spans/${encodeURIComponent(id)}/approve`, { version }),
  return: (id: string, version: number, reason: string) => api.post<Span>(`/api/spans/${encodeURIComponent(id)}/return`, { version, reason }),
  suspend: (id: string, version: number, reason: string) => api.post<Span>(`/api/spans/${encodeURIComponent(id)}/suspend`, { version, reason }),
  reinstate: (id: string, version: number) => api.post<Span>(`/api/spans/${encodeURIComponent(id)}/reinstate`, { version }),
  /** The span's history (its own audit entries and those of its hazards and photos); none rather than a failure if unavailable. */
  audit: async (id: string): Promise<AuditEntryView[]> => {
    try {
      const res = await api.get<{ items: AuditEntryView[] }>(`/api/audit/spans/${encodeURIComponent(id)}`);
      return res.items ?? [];
    } catch (err) {
      if (err instanceof ApiError && (err.status === 404 || err.status === 403)) return [];
      throw err;
    }
  },
  exportUrl: (format: 'geojson' | 'csv' | 'kml', q: SpanListQuery) => {
    const { page: _p, pageSize: _s, sort: _o, ...filters } = q;
    return `/api/spans/export.${format}${qs({ ...filters })}`;
  },
};

export const inventoryApi = {
  lines: () => api.get<{ items: Line[] }>('/api/lines'),
  structures: (lineId: string) => api.get<{ items: Structure[] }>(`/api/structures${qs({ lineId })}`),
  createStructure: (body: { lineId: string; lat: number; lon: number; kind: string; attachmentHeightM: number | null; label?: string }) =>
    api.post<Structure>('/api/structures', body),
  conductors: () => api.get<{ items: ConductorCatalogueEntry[] }>('/api/conductors'),
  hazardKinds: () => api.get<{ items: HazardKind[] }>('/api/hazard-kinds'),
};
