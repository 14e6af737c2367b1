// The surveyor's home: their spans, returned first with the reviewer's reason, then drafts, then the rest. Every
// record is reachable: each group loads page after page as the surveyor scrolls, and only the cards on screen
// (and a few around them) are in the page, so a queue of thousands scrolls as smoothly as one of ten.
import { useEffect, useLayoutEffect, useRef, useState } from 'react';
import { useInfiniteQuery } from '@tanstack/react-query';
import { useWindowVirtualizer } from '@tanstack/react-virtual';
import { Link, useLocation } from 'react-router';
import { TERRAIN_LABELS, type Span } from '#shared/schemas/inventory.ts';
import { formatQuantity } from '#shared/units.ts';
import { useMe } from '../../auth/queries.ts';
import { fieldQueries } from '../queries.ts';
import { StatusBadge } from '../../spans/components/status-badge.tsx';
import { QUEUE_GROUPS } from '../queue.ts';
import { count, date } from '../../../lib/format.ts';
import { useOutbox } from '../../../lib/use-outbox.ts';
import { WaitingBadge } from '../../../components/waiting-badge.tsx';

type Row = { kind: 'header'; group: (typeof QUEUE_GROUPS)[number]; total: number } | { kind: 'span'; span: Span } | { kind: 'more'; group: number };

/** Rows until the end of what is loaded at which the next page is asked for. */
const LOAD_AHEAD = 30;

export function MySpansQueue() {
  const me = useMe();
  const location = useLocation();
  const notice = (location.state as { notice?: string } | null)?.notice;
  // One query per group, in queue order (a fixed number of hooks).
  const returned = useInfiniteQuery(fieldQueries.queueGroup(me.id, QUEUE_GROUPS[0].statuses));
  const drafts = useInfiniteQuery(fieldQueries.queueGroup(me.id, QUEUE_GROUPS[1].statuses));
  const done = useInfiniteQuery(fieldQueries.queueGroup(me.id, QUEUE_GROUPS[2].statuses));
  const groups = [returned, drafts, done];
  const outbox = useOutbox();
  const mine = outbox.items.filter((i) => i.userId === me.id);
  // Spans made on this device and not sent yet; and the ids of saved spans with entries still waiting.
  const kept = mine.filter((i) => i.kind === 'span.create').map((i) => i.preview as Span);
  const waitingIds = new Set(mine.flatMap((i) => (i.kind.startsWith('span.') ? i.touches : [])));

  const rows: Row[] = [];
  groups.forEach((q, i) => {
    const total = q.data?.pages[0]?.total ?? 0;
    if (!total) return;
    rows.push({ kind: 'header', group: QUEUE_GROUPS[i], total });
    for (const p of q.data!.pages) for (const span of p.items) rows.push({ kind: 'span', span });
    if (q.hasNextPage) rows.push({ kind: 'more', group: i });
  });

  const listRef = useRef<HTMLDivElement>(null);
  const [margin, setMargin] = useState(0);
  useLayoutEffect(() => setMargin(listRef.current?.offsetTop ?? 0), [notice, rows.length > 0, kept.length, groups.some((q) => q.isPending)]);
  const virtualizer = useWindowVirtualizer({
    count: rows.length,
    estimateSize: (i) => (rows[i]?.kind === 'header' ? 48 : rows[i]?.kind === 'more' ? 40 : 96),
    overscan: 8,
    scrollMargin: margin,
    getItemKey: (i) => {
      const r = rows[i];
      return r.kind === 'span' ? r.span.id : r.kind === 'header' ? `h-${r.group.id}` : `m-${r.group}`;
    },
  });
  const items = virtualizer.getVirtualItems();
  const last = items.length ? items[items.length - 1].index : -1;

  // Near the end of a group that has more: its next page (a group is finished before the next one is read on).
  useEffect(() => {
    for (let i = Math.max(0, last - LOAD_AHEAD); i < Math.min(rows.length, last + LOAD_AHEAD); i++) {
      const r = rows[i];
      if (r?.kind !== 'more') continue;
      const q = groups[r.group];
      if (!q.isFetchingNextPage) void q.fetchNextPage();
      break;
    }
  });

  const pending = groups.some((q) => q.isPending);
  const error = groups.find((q) => q.error)?.error;

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
      {pending && <p className="text-ink-700">Loading your spans…</p>}
      {error && <p className="field-error" role="alert">Your spans did not load: {error.message}</p>}
      {!pending && !error && rows.length > 0 && (
        <p className="text-ink-700" data-testid="queue-total">
          {count(groups.reduce((n, q) => n + (q.data?.pages[0]?.total ?? 0), 0))} spans of yours on the server; the queue loads more as you scroll.
        </p>
      )}
      {!pending && !error && rows.length === 0 && <p className="card">No spans yet. Start with “New span” when you reach the first structure.</p>}
      <div ref={listRef} role="list" aria-label="Your spans" style={{ height: virtualizer.getTotalSize(), position: 'relative' }}>
        {items.map((item) => {
          const r = rows[item.index];
          return (
            <div
              key={item.key}
              data-index={item.index}
              ref={virtualizer.measureElement}
              role="listitem"
              className="absolute inset-x-0 top-0 pb-3"
              style={{ transform: `translateY(${item.start - virtualizer.options.scrollMargin}px)` }}
            >
              {r.kind === 'header' && (
                <h2 id={`queue-${r.group.id}`} className="pt-3 text-lg font-bold">
                  {r.group.title} <span className="text-ink-500">({count(r.total)})</span>
                </h2>
              )}
              {r.kind === 'more' && <p className="text-sm text-ink-700">Loading more of your spans…</p>}
              {r.kind === 'span' && <SpanCard span={r.span} unitSystem={me.unitSystem} waiting={waitingIds.has(r.span.id)} />}
            </div>
          );
        })}
      </div>
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

function SpanCard({ span: s, unitSystem, waiting }: { span: Span; unitSystem: Parameters<typeof formatQuantity>[2]; waiting: boolean }) {
  return (
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
        {waiting && <WaitingBadge />}
      </span>
      <span className="text-sm text-ink-700">
        {s.lineName} · {formatQuantity(s.lengthM, 'length', unitSystem)}
        {s.terrain ? ` · ${TERRAIN_LABELS[s.terrain]}` : ''} · {s.surveyDate ? date(s.surveyDate) : 'no survey date'}
      </span>
      {s.status === 'returned' && s.returnReason && (
        <span className="mt-1 rounded-lg bg-red-50 p-2 text-ink-900">
          <strong className="text-alarm">Reviewer’s reason:</strong> {s.returnReason}
        </span>
      )}
    </Link>
  );
}
