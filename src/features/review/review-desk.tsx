import { useEffect, useRef, useState, type ReactNode } from 'react';
import { Link } from 'react-router';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { Span } from '#shared/schemas/inventory.ts';
import { formatQuantity } from '#shared/units.ts';
import { ApiError } from '../../lib/api.ts';
import { codeWords, date, gateDetail } from '../../lib/format.ts';
import { Caution } from '../../components/caution.tsx';
import { useMe } from '../auth/queries.ts';
import { spanApi } from '../spans/api.ts';
import { inventoryQueries, spanQueries } from '../spans/queries.ts';
import { StatusBadge } from '../spans/components/status-badge.tsx';
import { SpanAssessmentSlot } from '../spans/components/span-assessment-slot.tsx';
import { PhotoGallery } from '../photos/photo-gallery.tsx';
import { ZoneConflicts } from './components/zone-conflicts.tsx';
import { SpanHistory } from './components/span-history.tsx';
import { commandForKey, lowHarvestMark, orderQueue, QUEUES, queuedSince, queueFilter, queueStatus, waitingFor, type QueueKind } from './queue.ts';

type ReasonMode = 'return' | 'suspend';

const isTyping = (el: EventTarget | null) =>
  el instanceof HTMLElement && (el.tagName === 'INPUT' || el.tagName === 'TEXTAREA' || el.tagName === 'SELECT' || el.isContentEditable);

/** The safety officer's desk: a queue on the left, the selected span with everything needed to decide on the right. */
export function ReviewDesk({ evidenceSlot }: { evidenceSlot?: (span: Span) => ReactNode } = {}) {
  const system = useMe().unitSystem;
  const [kind, setKind] = useState<QueueKind>('submitted');
  const list = useQuery(spanQueries.list({ ...queueFilter(kind), sort: 'updatedAt', pageSize: 200 }));
  const status = queueStatus(kind);
  const spans = orderQueue(list.data?.items ?? [], status);
  // How many approved spans need a decision, shown on their tab whichever queue is open.
  const decisions = useQuery(spanQueries.list({ ...queueFilter('decision'), pageSize: 1 }));
  const decisionCount = decisions.data?.total ?? 0;
  const [selectedId, setSelectedId] = useState<string | null>(null);
  const lastIndex = useRef(0);
  let index = spans.findIndex((s) => s.id === selectedId);
  // The decided span left the queue: stay at the same place, i.e. on the next one.
  if (index < 0) index = Math.min(lastIndex.current, spans.length - 1);
  lastIndex.current = Math.max(index, 0);
  const current = index >= 0 ? spans[index] : undefined;
  const [mode, setMode] = useState<ReasonMode | null>(null);
  const listRef = useRef<HTMLOListElement>(null);

  const select = (i: number) => {
    const s = spans[Math.max(0, Math.min(spans.length - 1, i))];
    if (!s) return;
    setSelectedId(s.id);
    setMode(null);
    listRef.current?.querySelector<HTMLElement>(`[data-span-id="${s.id}"]`)?.scrollIntoView({ block: 'nearest' });
  };

  const queryClient = useQueryClient();
  const [notice, setNotice] = useState<DecisionNotice | null>(null);
  const decide = useDecision((n) => {
    setMode(null);
    setNotice(n);
  });
  // The notice says what the last decision did, then steps aside.
  useEffect(() => {
    if (!notice) return;
    const t = setTimeout(() => setNotice(null), 10_000);
    return () => clearTimeout(t);
  }, [notice]);
  // The freshest copy of the selected span (its detail query), so a decision carries the current version.
  const fresh = (s: Span) => queryClient.getQueryData(spanQueries.detail(s.id).queryKey) ?? s;

  const handler = useRef<(e: KeyboardEvent) => void>(() => undefined);
  handler.current = (e) => {
    const cmd = commandForKey(e, isTyping(e.target));
    if (!cmd) return;
    if (cmd === 'cancel') {
      if (mode) {
        e.preventDefault();
        setMode(null);
      }
      return;
    }
    e.preventDefault();
    if (cmd === 'next') return select(index + 1);
    if (cmd === 'previous') return select(index - 1);
    if (!current || decide.isPending) return;
    if (cmd === 'approve' && current.status === 'submitted' && !(current.failingGates?.length)) decide.mutate({ action: 'approve', span: fresh(current) });
    if (cmd === 'return' && (current.status === 'submitted' || current.needsDecision)) setMode('return');
    if (cmd === 'suspend' && current.status === 'approved') setMode('suspend');
    if (cmd === 'reinstate' && current.status === 'suspended') decide.mutate({ action: 'reinstate', span: fresh(current) });
  };
  useEffect(() => {
    const on = (e: KeyboardEvent) => handler.current(e);
    window.addEventListener('keydown', on);
    return () => window.removeEventListener('keydown', on);
  }, []);

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center gap-2">
        <div role="tablist" aria-label="Queue" className="flex flex-wrap gap-2">
          {QUEUES.map((q) => (
            <button
              key={q.kind}
              type="button"
              role="tab"
              aria-selected={kind === q.kind}
              className={kind === q.kind ? 'btn-primary' : 'btn-ghost'}
              onClick={() => {
                setKind(q.kind);
                setSelectedId(null);
                lastIndex.current = 0;
                setMode(null);
              }}
            >
              {q.label}
              {q.kind === 'decision' && decisionCount > 0 && (
                <span className="ml-1.5 rounded-full bg-alarm px-2 py-0.5 text-xs font-bold text-white" aria-label={`${decisionCount} waiting`}>{decisionCount}</span>
              )}
            </button>
          ))}
        </div>
        <Link to="/admin/audit" className="ml-auto text-sm font-semibold underline">Audit log</Link>
      </div>
      <Shortcuts kind={kind} />
      {list.error && <p role="alert" className="field-error">{list.error.message}</p>}
      <div className="grid gap-4 lg:grid-cols-[20rem_1fr]">
        <section aria-labelledby="queue-title" className="card max-h-56 overflow-y-auto p-0 lg:max-h-none lg:overflow-visible">
          <h2 id="queue-title" className="border-b border-ink-100 px-4 py-2 font-bold">
            {QUEUES.find((q) => q.kind === kind)!.label}{' '}
            <span className="font-normal text-ink-700">· {list.data ? `${list.data.total} span${list.data.total === 1 ? '' : 's'}` : '…'}, {QUEUES.find((q) => q.kind === kind)!.hint}</span>
          </h2>
          {list.isPending ? (
            <p className="p-4">Loading…</p>
          ) : spans.length === 0 ? (
            <p className="p-4 text-ink-700">
              {kind === 'submitted' ? 'Nothing waiting. The queue is clear.' : kind === 'decision' ? 'Every approved span still passes its gates.' : 'No spans here.'}
            </p>
          ) : (
            <ol ref={listRef} aria-label="Spans in the queue" className="max-h-[70vh] divide-y divide-ink-100 overflow-y-auto">
              {spans.map((s, i) => (
                <li key={s.id}>
                  <button
                    type="button"
                    data-span-id={s.id}
                    aria-current={i === index ? 'true' : undefined}
                    onClick={() => select(i)}
                    className={`block w-full px-4 py-3 text-left ${i === index ? 'bg-brass-100' : 'hover:bg-ink-50'}`}
                  >
                    <span className="block font-semibold">{s.fromStructureLabel} → {s.toStructureLabel}</span>
                    <span className="block text-sm text-ink-700">{s.lineName}</span>
                    <span className="block text-sm">
                      <span className="font-semibold">{kind === 'submitted' ? 'waiting' : 'since'} {waitingFor(queuedSince(s, status))}</span>
                      {s.assessment && <span className="text-ink-700"> · score {Math.round(s.assessment.score)}{s.assessment.perchable ? '' : ' · not perchable'}</span>}
                    </span>
                    {s.needsDecision && (s.failingGates?.length ?? 0) > 0 && (
                      <span className="block text-sm font-semibold text-alarm">Now fails {listWords(s.failingGates!.map((g) => g.label))}</span>
                    )}
                    {lowHarvestMark(s, system) && (
                      <span className="block text-sm font-semibold text-alarm" data-testid="low-harvest-mark">
                        <span aria-hidden>▼ </span>{lowHarvestMark(s, system)}
                      </span>
                    )}
                  </button>
                </li>
              ))}
            </ol>
          )}
          {list.data && list.data.total > spans.length && (
            <p className="border-t border-ink-100 px-4 py-2 text-sm text-ink-700">
              Showing the {spans.length} longest-waiting of {list.data.total}; the <Link to={`/spans?status=${status}`} className="underline">spans table</Link> has them all.
            </p>
          )}
        </section>
        {current ? (
          <SpanReview key={current.id} spanId={current.id} listed={current} mode={mode} setMode={setMode} decide={decide} evidenceSlot={evidenceSlot} />
        ) : (
          !list.isPending && <p className="card text-ink-700">Select a span from the queue.</p>
        )}
      </div>
      {/* Fixed, so saying what happened never moves the queue or the decision buttons under the pointer. */}
      <div role="status" aria-live="polite" className="pointer-events-none fixed inset-x-0 top-20 z-50 flex justify-center px-4">
        {notice && (
          <p className="pointer-events-auto flex max-w-xl items-center gap-3 rounded-xl bg-ink-900 px-4 py-3 text-sm text-chalk shadow-lg" data-testid="decision-notice">
            <span>{notice.text}</span>
            <Link to={`/spans/${notice.spanId}`} className="shrink-0 font-semibold text-brass-300 underline">Open the span</Link>
            <button type="button" className="shrink-0 rounded-lg px-2 font-semibold text-chalk" aria-label="Close the notice" onClick={() => setNotice(null)}>×</button>
          </p>
        )}
      </div>
    </div>
  );
}

function Shortcuts({ kind }: { kind: QueueKind }) {
  const keys: [string, string][] = [
    ['j / ↓', 'next'],
    ['k / ↑', 'previous'],
    ...(kind === 'submitted' ? ([['a', 'approve'], ['r', 'return with a reason']] as [string, string][]) : []),
    ...(kind === 'approved' ? ([['s', 'suspend with a reason']] as [string, string][]) : []),
    ...(kind === 'decision' ? ([['s', 'suspend with a reason'], ['r', 'return to the surveyor']] as [string, string][]) : []),
    ...(kind === 'suspended' ? ([['u', 'reinstate']] as [string, string][]) : []),
    ['Esc', 'cancel'],
  ];
  return (
    <p aria-label="Keyboard shortcuts" className="flex flex-wrap gap-x-4 gap-y-1 text-sm text-ink-700">
      {keys.map(([k, what]) => (
        <span key={k}>
          <kbd className="rounded border border-ink-200 bg-white px-1.5 py-0.5 font-mono text-xs font-semibold text-ink-900">{k}</kbd> {what}
        </span>
      ))}
    </p>
  );
}

type Decision = { span: Span } & ({ action: 'approve' } | { action: 'reinstate' } | { action: 'return'; reason: string } | { action: 'suspend'; reason: string });

/** What a decision did, in words, for the notice at the foot of the desk. */
export function decisionWords(action: Decision['action'], span: Pick<Span, 'fromStructureLabel' | 'toStructureLabel' | 'lineName'>): string {
  const name = `${span.fromStructureLabel} → ${span.toStructureLabel} (${span.lineName})`;
  if (action === 'approve') return `Approved ${name}. Planners can now perch on it; suspend it with a reason to withdraw.`;
  if (action === 'reinstate') return `Reinstated ${name}. It is approved again.`;
  if (action === 'return') return `Returned ${name} to the surveyor with your reason.`;
  return `Suspended ${name}. Planners no longer see it.`;
}

interface DecisionNotice { text: string; spanId: string }

function useDecision(onDone: (notice: DecisionNotice) => void) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (d: Decision) => {
      const span = d.span;
      if (d.action === 'approve') return spanApi.approve(span.id, span.version);
      if (d.action === 'reinstate') return spanApi.reinstate(span.id, span.version);
      if (d.action === 'return') return spanApi.return(span.id, span.version, d.reason);
      return spanApi.suspend(span.id, span.version, d.reason);
    },
    onSuccess: async (updated, d) => {
      queryClient.setQueryData(spanQueries.detail(updated.id).queryKey, updated);
      onDone({ text: decisionWords(d.action, updated), spanId: updated.id });
      await queryClient.invalidateQueries({ queryKey: spanQueries.all() });
      await queryClient.invalidateQueries({ queryKey: ['audit'] });
    },
    onError: async (err) => {
      if (err instanceof ApiError && err.status === 409) await queryClient.invalidateQueries({ queryKey: spanQueries.all() });
    },
  });
}

function SpanReview({
  spanId,
  listed,
  mode,
  setMode,
  decide,
  evidenceSlot,
}: {
  spanId: string;
  listed: Span;
  mode: ReasonMode | null;
  setMode: (m: ReasonMode | null) => void;
  decide: ReturnType<typeof useDecision>;
  evidenceSlot?: (span: Span) => ReactNode;
}) {
  const me = useMe();
  const system = me.unitSystem;
  const detail = useQuery({ ...spanQueries.detail(spanId), initialData: listed });
  const kinds = useQuery(inventoryQueries.hazardKinds());
  const span = detail.data;
  const c = span.conductor;
  const kindLabel = (id: string) => kinds.data?.find((k) => k.id === id)?.label ?? id;
  useEffect(() => decide.reset(), [spanId]); // eslint-disable-line react-hooks/exhaustive-deps

  return (
    <article aria-labelledby="review-span-title" className="space-y-4">
      <header className="card space-y-2">
        <div className="flex flex-wrap items-center gap-3">
          <h2 id="review-span-title" className="text-xl font-bold">{span.fromStructureLabel} → {span.toStructureLabel}</h2>
          <StatusBadge status={span.status} />
          <Link to={`/spans/${span.id}`} className="ml-auto text-sm font-semibold underline">Full record</Link>
        </div>
        <p className="text-ink-700">
          {span.lineName} · surveyed {date(span.surveyDate)}
          {span.status === 'submitted' && ` · waiting ${waitingFor(queuedSince(span, 'submitted'))}`}
        </p>
        <dl className="grid grid-cols-2 gap-3 sm:grid-cols-4">
          <Fact label="Length">{formatQuantity(span.lengthM, 'length', system)}</Fact>
          <Fact label="Clearance at perch point">{formatQuantity(span.clearanceM, 'length', system)}</Fact>
          <Fact label="Lowest clearance">{formatQuantity(span.lowestClearanceM, 'length', system)}</Fact>
          <Fact label="Load current">{formatQuantity(span.loadCurrentA, 'current', system)}{span.loadCurrentSource === 'line' ? ' (line)' : ''}</Fact>
          <Fact label="Conductor">{c ? (c.codeWord ?? c.size ?? 'custom') : '—'}</Fact>
          <Fact label="Diameter">{formatQuantity(c?.diameterMm ?? null, 'diameter', system)}</Fact>
          <Fact label="Terrain">{span.terrain ?? '—'}</Fact>
          <Fact label="Photos">{span.photoIds.length}</Fact>
        </dl>
        <Caution compact />
        {span.returnReason && span.status !== 'approved' && <p className="rounded-lg bg-brass-100 p-2 text-sm"><strong>Last returned:</strong> {span.returnReason}</p>}
        {span.suspendReason && span.status === 'suspended' && <p className="rounded-lg bg-red-50 p-2 text-sm text-alarm"><strong>Suspended:</strong> {span.suspendReason}</p>}
      </header>

      {/* What flights measured on this span (the load-evidence feature, composed in src/app/router.tsx). */}
      {evidenceSlot?.(span)}
      <DecisionPanel span={span} mode={mode} setMode={setMode} decide={decide} />

      <section aria-labelledby="sec-zones" className="card space-y-2">
        <h3 id="sec-zones" className="font-bold">Zone conflicts</h3>
        <ZoneConflicts span={span} />
      </section>
      <section aria-labelledby="sec-assessment" className="card space-y-2">
        <h3 id="sec-assessment" className="font-bold">Assessment and score</h3>
        <SpanAssessmentSlot span={span} unitSystem={system} />
      </section>
      <section aria-labelledby="sec-hazards" className="card space-y-2">
        <h3 id="sec-hazards" className="font-bold">Hazards</h3>
        {span.hazards.length === 0 ? (
          <p className="text-sm text-ink-700">None recorded.</p>
        ) : (
          <ul className="space-y-1 text-sm">
            {span.hazards.map((h) => (
              <li key={h.id}>
                <strong className={h.severity === 'high' ? 'text-alarm' : ''}>{kindLabel(h.kindId)}</strong> · {codeWords(h.severity)} severity
                {h.positionAlongM != null && ` · ${formatQuantity(h.positionAlongM, 'length', system)} from ${span.fromStructureLabel}`}
                {h.note && ` · ${h.note}`}
              </li>
            ))}
          </ul>
        )}
      </section>
      <section aria-labelledby="sec-photos" className="card space-y-2">
        <h3 id="sec-photos" className="font-bold">Photos</h3>
        <PhotoGallery spanId={span.id} />
      </section>
      <section aria-labelledby="sec-history" className="card space-y-2">
        <h3 id="sec-history" className="font-bold">History</h3>
        <SpanHistory spanId={span.id} />
      </section>
    </article>
  );
}

function Fact({ label, children }: { label: string; children: React.ReactNode }) {
  return (
    <div>
      <dt className="text-sm text-ink-700">{label}</dt>
      <dd className="font-semibold">{children}</dd>
    </div>
  );
}

function DecisionPanel({ span, mode, setMode, decide }: { span: Span; mode: ReasonMode | null; setMode: (m: ReasonMode | null) => void; decide: ReturnType<typeof useDecision> }) {
  const me = useMe();
  const [reason, setReason] = useState('');
  const [localError, setLocalError] = useState<string | null>(null);
  const reasonRef = useRef<HTMLTextAreaElement>(null);
  useEffect(() => {
    if (mode) reasonRef.current?.focus();
    else setReason('');
    setLocalError(null);
  }, [mode]);
  const err = decide.error instanceof ApiError ? decide.error : null;
  // The server refuses approval whatever the screen; the desk says why before anyone tries.
  const failing = span.perchable === false ? (span.failingGates ?? []) : [];
  const send = () => {
    if (!mode) return;
    if (!reason.trim()) return setLocalError('Give a reason');
    decide.mutate(mode === 'return' ? { action: 'return', reason: reason.trim(), span } : { action: 'suspend', reason: reason.trim(), span });
  };
  return (
    <section aria-labelledby="sec-decision" className="card space-y-3">
      <h3 id="sec-decision" className="font-bold">Decision</h3>
      {failing.length > 0 && (
        <div role="alert" className="rounded-lg border border-alarm bg-chalk p-3 text-sm" data-testid="failing-gates">
          <p className="font-semibold text-alarm">
            {span.status === 'approved' ? 'Needs a decision: this approved span now fails' : 'Cannot be approved: no active drone and harvester pass'}{' '}
            {failing.length === 1 ? 'this gate' : 'these gates'}
          </p>
          <ul className="mt-1 list-disc pl-5">
            {failing.map((g) => (
              <li key={g.id}><strong>{g.label}</strong>{g.detail ? ` — ${gateDetail(g, me.unitSystem)}` : ''}</li>
            ))}
          </ul>
          {span.status === 'submitted' && <p className="mt-1">Return it to the surveyor with what to fix.</p>}
          {span.status === 'approved' && <p className="mt-1">It is no longer offered to planners. Suspend it, or return it to the surveyor with what to change.</p>}
        </div>
      )}
      <div className="flex flex-wrap gap-2">
        {span.status === 'submitted' && (
          <>
            {failing.length === 0 && (
              <button type="button" className="btn-primary" disabled={decide.isPending} onClick={() => decide.mutate({ action: 'approve', span })}>
                Approve <kbd className="text-xs opacity-70">a</kbd>
              </button>
            )}
            <button type="button" className={failing.length ? 'btn-primary' : 'btn-ghost'} aria-expanded={mode === 'return'} onClick={() => setMode(mode === 'return' ? null : 'return')}>
              {failing.length ? 'Return to surveyor' : 'Return with a reason'} <kbd className="text-xs opacity-70">r</kbd>
            </button>
          </>
        )}
        {span.status === 'approved' && (
          <button type="button" className="btn-danger" aria-expanded={mode === 'suspend'} onClick={() => setMode(mode === 'suspend' ? null : 'suspend')}>
            Suspend with a reason <kbd className="text-xs opacity-70">s</kbd>
          </button>
        )}
        {span.status === 'approved' && span.needsDecision && (
          <button type="button" className="btn-ghost" aria-expanded={mode === 'return'} onClick={() => setMode(mode === 'return' ? null : 'return')}>
            Return to surveyor <kbd className="text-xs opacity-70">r</kbd>
          </button>
        )}
        {span.status === 'suspended' && (
          <button type="button" className="btn-primary" disabled={decide.isPending} onClick={() => decide.mutate({ action: 'reinstate', span })}>
            Reinstate <kbd className="text-xs opacity-70">u</kbd>
          </button>
        )}
      </div>
      {mode && (
        <form
          className="space-y-2"
          onSubmit={(e) => {
            e.preventDefault();
            send();
          }}
        >
          <label htmlFor="review-reason" className="field-label">{mode === 'return' ? 'What should the surveyor fix?' : 'Why is this span suspended?'}</label>
          <textarea
            id="review-reason"
            ref={reasonRef}
            className="field-input"
            rows={3}
            maxLength={2000}
            value={reason}
            onChange={(e) => setReason(e.target.value)}
            onKeyDown={(e) => {
              if (e.key === 'Enter' && (e.ctrlKey || e.metaKey)) {
                e.preventDefault();
                send();
              }
            }}
          />
          <div className="flex flex-wrap items-center gap-2">
            <button type="submit" className={mode === 'suspend' ? 'btn-danger' : 'btn-primary'} disabled={decide.isPending}>
              {mode === 'return' ? 'Return to the surveyor' : 'Suspend the span'}
            </button>
            <button type="button" className="btn-ghost" onClick={() => setMode(null)}>Cancel</button>
            <span className="text-sm text-ink-700"><kbd>Ctrl</kbd>+<kbd>Enter</kbd> sends · <kbd>Esc</kbd> cancels</span>
          </div>
        </form>
      )}
      {(localError || decide.error) && (
        <div role="alert" className="rounded-lg bg-red-50 p-3 text-sm text-alarm">
          <p className="font-semibold">{localError ?? err?.issueFor('reason') ?? decide.error?.message}</p>
          {err && err.issues.filter((i) => i.path !== 'reason').length > 0 && (
            <ul className="list-disc pl-5">
              {err.issues.filter((i) => i.path !== 'reason').map((i, n) => <li key={n}>{i.message}</li>)}
            </ul>
          )}
        </div>
      )}
    </section>
  );
}

/** "a", "a and b", "a, b and c". */
function listWords(words: string[]): string {
  return words.length > 1 ? `${words.slice(0, -1).join(', ')} and ${words[words.length - 1]}` : (words[0] ?? '');
}
