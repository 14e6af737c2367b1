// One queryOptions factory per record kind, shared by loaders, components and invalidation.
import { infiniteQueryOptions, keepPreviousData, queryOptions } from '@tanstack/react-query';
import { inventoryApi, spanApi } from './api.ts';
import type { SpanListQuery } from './table-url-state.ts';

export const spanQueries = {
  all: () => ['spans'] as const,
  lists: () => [...spanQueries.all(), 'list'] as const,
  list: (q: SpanListQuery) =>
    queryOptions({ queryKey: [...spanQueries.lists(), q], queryFn: () => spanApi.list(q), placeholderData: keepPreviousData }),
  /** Every span matching `q`, page after page of `pageSize` as the reader scrolls (no cap); on the list keys, so list invalidation reaches it. */
  pages: (q: Omit<SpanListQuery, 'page' | 'pageSize'>, pageSize: number) =>
    infiniteQueryOptions({
      queryKey: [...spanQueries.lists(), 'pages', q, pageSize],
      queryFn: ({ pageParam }) => spanApi.list({ ...q, page: pageParam, pageSize }),
      initialPageParam: 1,
      getNextPageParam: (last) => (last.page * last.pageSize < last.total ? last.page + 1 : undefined),
      placeholderData: keepPreviousData,
    }),
  detail: (id: string) => queryOptions({ queryKey: [...spanQueries.all(), 'detail', id], queryFn: () => spanApi.get(id) }),
  history: (id: string) => queryOptions({ queryKey: [...spanQueries.all(), 'history', id], queryFn: () => spanApi.audit(id), staleTime: 0 }),
};

export const inventoryQueries = {
  lines: () => queryOptions({ queryKey: ['lines'], queryFn: async () => (await inventoryApi.lines()).items, staleTime: 5 * 60_000 }),
  structures: (lineId: string) =>
    queryOptions({ queryKey: ['structures', lineId], queryFn: async () => (await inventoryApi.structures(lineId)).items, enabled: !!lineId }),
  conductors: () => queryOptions({ queryKey: ['conductors'], queryFn: async () => (await inventoryApi.conductors()).items, staleTime: 30 * 60_000 }),
  hazardKinds: () => queryOptions({ queryKey: ['hazard-kinds'], queryFn: async () => (await inventoryApi.hazardKinds()).items, staleTime: 5 * 60_000 }),
};
