import type { AdminUser, AuditItem, CrewItem, InvitationCreateInput, InvitationItem, OutboxItem, Page, UserUpdateInput } from '#shared/schemas/accounts.ts';
import { api, qs } from '../../lib/api.ts';

export interface UserFilters {
  q?: string;
  role?: string;
  crewId?: string;
  active?: string;
  page?: number;
}

export interface AuditFilters {
  userId?: string;
  recordType?: string;
  recordId?: string;
  action?: string;
  from?: string;
  to?: string;
  page?: number;
}

export interface AuditFacets {
  actions: string[];
  recordTypes: string[];
  users: { id: string; name: string }[];
}

export const adminApi = {
  users: (f: UserFilters) => api.get<Page<AdminUser>>(`/api/admin/users${qs({ ...f })}`),
  updateUser: (id: string, input: UserUpdateInput) => api.patch<AdminUser>(`/api/admin/users/${id}`, input),
  deactivate: (id: string) => api.post<AdminUser>(`/api/admin/users/${id}/deactivate`),
  reactivate: (id: string) => api.post<AdminUser>(`/api/admin/users/${id}/reactivate`),
  invitations: () => api.get<{ items: InvitationItem[] }>('/api/admin/invitations'),
  invite: (input: InvitationCreateInput) => api.post<InvitationItem>('/api/admin/invitations', input),
  resendInvitation: (id: string) => api.post<InvitationItem>(`/api/admin/invitations/${id}/resend`),
  revokeInvitation: (id: string) => api.delete<void>(`/api/admin/invitations/${id}`),
  crews: () => api.get<{ items: CrewItem[] }>('/api/admin/crews'),
  createCrew: (name: string) => api.post<CrewItem>('/api/admin/crews', { name }),
  renameCrew: (id: string, name: string) => api.patch<CrewItem>(`/api/admin/crews/${id}`, { name }),
  deleteCrew: (id: string) => api.delete<void>(`/api/admin/crews/${id}`),
  outbox: () => api.get<{ items: OutboxItem[]; via: 'catcher' | 'smtp' }>('/api/admin/outbox'),
  audit: (f: AuditFilters) => api.get<Page<AuditItem>>(`/api/audit${qs({ ...f })}`),
  auditFacets: () => api.get<AuditFacets>('/api/audit/facets'),
  spanHistory: (spanId: string) => api.get<{ items: AuditItem[] }>(`/api/audit/spans/${spanId}`),
};
