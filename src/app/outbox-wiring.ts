// Connects the outbox (src/lib/outbox.ts) to who is signed in and to the query cache.
import type { MeUser } from '#shared/schemas/auth.ts';
import { queryClient } from '../lib/query-client.ts';
import { configureOutbox, signedInAgain } from '../lib/outbox.ts';
import { authQueries } from '../features/auth/queries.ts';
import { inventoryQueries, spanQueries } from '../features/spans/queries.ts';

configureOutbox({
  currentUserId: () => queryClient.getQueryData<MeUser | null>(authQueries.me().queryKey)?.id ?? null,
  onSent: (item, result) => {
    const record = result as { id?: string; lineId?: string; version?: number } | undefined;
    if (item.kind === 'structure.create' && record?.lineId) void queryClient.invalidateQueries({ queryKey: inventoryQueries.structures(record.lineId).queryKey });
    if (item.kind.startsWith('span.') && record?.id) {
      queryClient.setQueryData(spanQueries.detail(record.id).queryKey, result as never);
      void queryClient.invalidateQueries({ queryKey: spanQueries.lists() });
    }
    if (item.kind === 'photo.upload') void queryClient.invalidateQueries({ queryKey: ['photos'] });
  },
  // Everything is through: read the server's records again (numbers, labels and assessments it computed).
  onDrained: () => void queryClient.invalidateQueries(),
});

// Signing in again (after a session ended offline) lets the kept writes go.
queryClient.getQueryCache().subscribe((e) => {
  if (e.type === 'updated' && e.query.queryKey[0] === 'me' && e.query.state.data) signedInAgain();
});
