// The surveyor's home: their spans, returned first with the reviewer's reason, then drafts, then the rest.
import { useQuery } from '@tanstack/react-query';
import { Link, useLocation } from 'react-router';
import { TERRAIN_LABELS } from '#shared/schemas/inventory.ts';
import { formatQuantity } from '#shared/units.ts';
import { useMe } from '../../auth/queries.ts';
import { fieldQueries } from '../queries.ts';
import { StatusBadge } from '../../spans/components/status-badge.tsx';
import { groupQueue } from '../queue.ts';
import { date } from '../../../lib/format.ts';
import type { Span } from '#shared/schemas/inventory.ts';
import { useOutbox } from '../../../lib/use-outbox.ts';
import { WaitingBadge } from '../../../components/waiting-badge.tsx';

export function MySpansQueue() {
  const me = useMe();
  const location = useLocation();
  const notice = (location.state as { notice?: string } | null)?.notice;
  const spans = useQuery(fieldQueries.mySpans(me.id));
  const groups = groupQueue(spans.data?.items ?? []);
  const outbox = useOutbox();
  const mine = outbox.items.filter((i) => i.userId === me.id);
  // Spans made on this device and not sent yet; and the ids of saved spans with entries still waiting.
  const kept = mine.filter((i) => i.kind === 'span.create').map((i) => i.preview as Span);
  const waitingIds = new Set(mine.flatMap((i) => (i.kind.startsWith('span.') ? i.touches : [])));

  return (
    <div className="space-y-6 pb-28">
      {notice && (
        <p role="status" className="rounded-lg bg-green-50 p-3 font-semibold text-go">
          {notice}
        </p>
      )}
      {kept.length > 0 && (
        <section aria-labelledby="queue-kept" className="space-y-3">
          <h2 id="queue-kept" className="text-lg font-bold">
            Kept on this device <span className="text-ink-500">({kept.length})</span>
          </h2>
          <ul className="space-y-3">
            {kept.map((s) => (
              <li key={s.id}>
                <Link to={`/field/spans/${s.id}/edit`} className="card flex min-h-16 flex-col gap-1 border-2 border-dashed border-brass-500 hover:border-brass-600" data-kept-span={s.id}>
                  <span className="flex flex-wrap items-center gap-2">
                    <span className="text-lg font-bold">{s.fromStructureLabel} → {s.toStructureLabel}</span>
                    <WaitingBadge />
                  </span>
                  <span className="text-sm text-ink-700">{s.lineName} · {formatQuantity(s.lengthM, 'length', me.unitSystem)}{s.surveyDate ? ` · ${s.surveyDate}` : ''}</span>
                </Link>
              </li>
            ))}
          </ul>
        </section>
      )}
      {spans.isPending && <p className="text-ink-700">Loading your spans…</p>}
      {spans.error && <p className="field-error" role="alert">Your spans did not load: {spans.error.message}</p>}
      {spans.data && spans.data.items.length === 0 && <p className="card">No spans yet. Start with “New span” when you reach the first structure.</p>}
      {spans.data && spans.data.total > spans.data.items.length && (
        <p className="text-sm text-ink-700">Showing your {spans.data.items.length} most recent of {spans.data.total} spans; the Spans table has them all.</p>
      )}
      {groups
        .filter((g) => g.spans.length)
        .map((g) => (
          <section key={g.id} aria-labelledby={`queue-${g.id}`} className="space-y-3">
            <h2 id={`queue-${g.id}`} className="text-lg font-bold">
              {g.title} <span className="text-ink-500">({g.spans.length})</span>
            </h2>
            <ul className="space-y-3">
              {g.spans.map((s) => (
                <li key={s.id}>
                  <Link
                    to={s.status === 'submitted' || s.status === 'suspended' ? `/spans/${s.id}` : `/field/spans/${s.id}/edit`}
                    className={`card flex min-h-16 flex-col gap-1 hover:border-ink-300 ${s.status === 'returned' ? 'border-2 border-alarm' : ''}`}
                    data-span-id={s.id}
                  >
                    <span className="flex flex-wrap items-center gap-2">
                      <span className="text-lg font-bold">
                        {s.fromStructureLabel} → {s.toStructureLabel}
                      </span>
                      <StatusBadge status={s.status} />
                      {waitingIds.has(s.id) && <WaitingBadge />}
                    </span>
                    <span className="text-sm text-ink-700">
                      {s.lineName} · {formatQuantity(s.lengthM, 'length', me.unitSystem)}
                      {s.terrain ? ` · ${TERRAIN_LABELS[s.terrain]}` : ''} · {s.surveyDate ? date(s.surveyDate) : 'no survey date'}
                    </span>
                    {s.status === 'returned' && s.returnReason && (
                      <span className="mt-1 rounded-lg bg-red-50 p-2 text-ink-900">
                        <strong className="text-alarm">Reviewer’s reason:</strong> {s.returnReason}
                      </span>
                    )}
                  </Link>
                </li>
              ))}
            </ul>
          </section>
        ))}
      <div className="fixed inset-x-0 bottom-0 z-20 border-t border-ink-200 bg-white/95 px-4 py-3">
        <div className="mx-auto max-w-3xl">
          <Link to="/field/spans/new" className="btn-accent min-h-14 w-full text-xl">
            + New span
          </Link>
        </div>
      </div>
    </div>
  );
}
