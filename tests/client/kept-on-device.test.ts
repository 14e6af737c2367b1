// What the device keeps of the query cache: a record whose refetch failed with no signal is still kept.
import { describe, expect, it } from 'vitest';
import { QueryClient } from '@tanstack/react-query';
import { keptOnDevice } from '../../src/lib/query-client.ts';

describe('kept on the device', () => {
  it('when a query with data fails its next refetch, then it is still kept; a query that never had data is not', async () => {
    const qc = new QueryClient({ defaultOptions: { queries: { retry: false } } });
    await qc.fetchQuery({ queryKey: ['me'], queryFn: async () => ({ id: 'U1' }) });
    await qc.fetchQuery({ queryKey: ['me'], queryFn: async () => Promise.reject(new Error('no signal')), staleTime: 0 }).catch(() => undefined);
    const me = qc.getQueryCache().find({ queryKey: ['me'] })!;
    expect(me.state.status).toBe('error');
    expect(keptOnDevice(me)).toBe(true);
    await qc.fetchQuery({ queryKey: ['never'], queryFn: async () => Promise.reject(new Error('no signal')) }).catch(() => undefined);
    expect(keptOnDevice(qc.getQueryCache().find({ queryKey: ['never'] })!)).toBe(false);
    await qc.fetchQuery({ queryKey: ['nobody'], queryFn: async () => null });
    expect(keptOnDevice(qc.getQueryCache().find({ queryKey: ['nobody'] })!)).toBe(false);
  });
});
