import { useMe } from '../../auth/queries.ts';
import { SpanHistoryList } from '../../spans/components/span-history-list.tsx';

/** Who did what to the span, newest first, each change in words. */
export function SpanHistory({ spanId }: { spanId: string }) {
  const me = useMe();
  return <SpanHistoryList spanId={spanId} system={me.unitSystem} />;
}
