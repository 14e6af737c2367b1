// A span's history, newest first: who did what, when, and each change in words in the viewer's units.
import { useQuery } from '@tanstack/react-query';
import type { UnitSystem } from '#shared/units.ts';
import { ChangeList } from '../../../components/change-list.tsx';
import { dateTime } from '../../../lib/format.ts';
import { actionLabel, describeChanges, type NameOf } from '../../../lib/history.ts';
import { inventoryQueries, spanQueries } from '../queries.ts';

export function SpanHistoryList({ spanId, system }: { spanId: string; system: UnitSystem }) {
  const history = useQuery(spanQueries.history(spanId));
  const span = useQuery(spanQueries.detail(spanId));
  const kinds = useQuery(inventoryQueries.hazardKinds());
  const lines = useQuery(inventoryQueries.lines());
  if (history.isPending) return <p className="text-sm text-ink-700">Loading history…</p>;
  if (history.error) return <p role="alert" className="field-error">{history.error.message}</p>;
  if (!history.data.length) return <p className="text-sm text-ink-700">No history recorded.</p>;
  const s = span.data;
  const nameOf: NameOf = (field, id) => {
    if (field === 'kindId') return kinds.data?.find((k) => k.id === id)?.label;
    if (field === 'lineId') return lines.data?.find((l) => l.id === id)?.name;
    if (s && id === s.fromStructureId) return `structure ${s.fromStructureLabel}`;
    if (s && id === s.toStructureId) return `structure ${s.toStructureLabel}`;
    if (field === 'spanId' && s && id === s.id) return 'this span';
    return undefined;
  };
  return (
    <ol className="space-y-2" aria-label="Span history">
      {history.data.map((e) => (
        <li key={String(e.id)} className="rounded-lg border border-ink-100 p-2">
          <p className="text-sm">
            <span className="font-semibold">{e.actorName ?? (e.actorId ? 'A former user' : 'The system')}</span> · {actionLabel(e.action)} ·{' '}
            <time className="text-ink-500" dateTime={e.at}>{dateTime(e.at)}</time>
          </p>
          <ChangeList changes={describeChanges(e.before, e.after, { system, nameOf })} emptyText="" />
        </li>
      ))}
    </ol>
  );
}
