import { keepPreviousData, queryOptions } from '@tanstack/react-query';
import { adminApi, type AuditFilters, type UserFilters } from './api.ts';

export const adminQueries = {
  all: ['admin'] as const,
  users: (f: UserFilters) => queryOptions({ queryKey: ['admin', 'users', f], queryFn: () => adminApi.users(f), placeholderData: keepPreviousData }),
  invitations: () => queryOptions({ queryKey: ['admin', 'invitations'], queryFn: adminApi.invitations }),
  crews: () => queryOptions({ queryKey: ['admin', 'crews'], queryFn: adminApi.crews }),
  outbox: () => queryOptions({ queryKey: ['admin', 'outbox'], queryFn: adminApi.outbox, refetchInterval: 5000 }),
};

export const auditQueries = {
  all: ['audit'] as const,
  list: (f: AuditFilters) => queryOptions({ queryKey: ['audit', 'list', f], queryFn: () => adminApi.audit(f), placeholderData: keepPreviousData }),
  facets: () => queryOptions({ queryKey: ['audit', 'facets'], queryFn: adminApi.auditFacets }),
  spanHistory: (spanId: string) => queryOptions({ queryKey: ['audit', 'span', spanId], queryFn: () => adminApi.spanHistory(spanId) }),
};
