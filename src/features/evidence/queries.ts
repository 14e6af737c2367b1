import { queryOptions } from '@tanstack/react-query';
import { evidenceApi, flightApi } from './api.ts';


export const evidenceQueries = {
  lines: () => queryOptions({ queryKey: ['evidence', 'lines'], queryFn: async () => (await evidenceApi.lines()).items }),
  summaries: () => queryOptions({ queryKey: ['evidence', 'summaries'], queryFn: async () => (await evidenceApi.summaries()).items }),
  span: (spanId: string) => queryOptions({ queryKey: ['evidence', 'span', spanId], queryFn: () => flightApi.ofSpan(spanId) }),
  line: (lineId: string, month?: string) => queryOptions({ queryKey: ['evidence', 'line', lineId, month ?? 'latest'], queryFn: () => evidenceApi.evidence(lineId, month) }),
};
