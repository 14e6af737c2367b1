import { queryOptions } from '@tanstack/react-query';
import { photoApi } from './api.ts';

export const photoQueries = {
  all: () => ['photos'] as const,
  bySpan: (spanId: string) =>
    queryOptions({ queryKey: [...photoQueries.all(), 'span', spanId], queryFn: async () => (await photoApi.list({ spanId })).items, enabled: !!spanId }),
  detail: (id: string) => queryOptions({ queryKey: [...photoQueries.all(), 'detail', id], queryFn: () => photoApi.get(id) }),
};
