import { useQuery } from '@tanstack/react-query';
import { spanQueries } from '../../spans/queries.ts';
import { AuditDiff, actionLabel } from '../../admin/components/audit-diff.tsx';

/** Who did what to the span, newest first, each with before → after. */
export function SpanHistory({ spanId }: { spanId: string }) {
  const history = useQuery(spanQueries.history(spanId));
  if (history.isPending) return <p className="text-sm text-ink-700">Loading history…</p>;
  if (history.error) return <p role="alert" className="field-error">{history.error.message}</p>;
  if (!history.data.length) return <p className="text-sm text-ink-700">No history recorded.</p>;
  return (
    <ol className="space-y-2" aria-label="Span history">
      {history.data.map((e) => (
        <li key={e.id} className="rounded-lg border border-ink-100 p-2">
          <p className="text-sm">
            <span className="font-semibold">{e.actorName ?? 'The system'}</span> · {actionLabel(e.action)}{' '}
            <time className="text-ink-500" dateTime={e.at}>{new Date(e.at).toLocaleString()}</time>
          </p>
          <AuditDiff entry={e} />
        </li>
      ))}
    </ol>
  );
}
