// Safety decisions on a span: approve, send back (reason), suspend (reason), reinstate. The server enforces who and when;
// these buttons only appear where they would be allowed.
import { useState } from 'react';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { Span } from '#shared/schemas/inventory.ts';
import type { Role } from '#shared/roles.ts';
import { ApiError } from '../../../lib/api.ts';
import { gateDetail } from '../../../lib/format.ts';
import { useMe } from '../../auth/queries.ts';
import { spanApi } from '../api.ts';
import { spanQueries } from '../queries.ts';

type Action = 'approve' | 'return' | 'suspend' | 'reinstate';

const ACTIONS: Record<Action, { from: Span['status'][]; label: string; needsReason: boolean; confirm: string; className: string }> = {
  approve: { from: ['submitted'], label: 'Approve', needsReason: false, confirm: 'Approve', className: 'btn-primary' },
  return: { from: ['submitted'], label: 'Send back…', needsReason: true, confirm: 'Send back to the surveyor', className: 'btn-ghost' },
  suspend: { from: ['approved'], label: 'Suspend…', needsReason: true, confirm: 'Suspend this span', className: 'btn-danger' },
  reinstate: { from: ['suspended'], label: 'Reinstate', needsReason: false, confirm: 'Reinstate', className: 'btn-primary' },
};

/** Which decisions a user may take on a span now. */
export function availableActions(span: Pick<Span, 'status'>, roles: readonly Role[]): Action[] {
  if (!roles.includes('safety')) return [];
  return (Object.keys(ACTIONS) as Action[]).filter((a) => ACTIONS[a].from.includes(span.status));
}

export function LifecycleActions({ span, roles, onDone }: { span: Span; roles: readonly Role[]; onDone?: (span: Span) => void }) {
  const queryClient = useQueryClient();
  const [pending, setPending] = useState<Action | null>(null);
  const [reason, setReason] = useState('');
  const [error, setError] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);

  const run = useMutation({
    mutationFn: ({ action, reason }: { action: Action; reason?: string }) => {
      if (action === 'approve') return spanApi.approve(span.id, span.version);
      if (action === 'reinstate') return spanApi.reinstate(span.id, span.version);
      if (action === 'return') return spanApi.return(span.id, span.version, reason ?? '');
      return spanApi.suspend(span.id, span.version, reason ?? '');
    },
    onSuccess: async (updated, { action }) => {
      queryClient.setQueryData(spanQueries.detail(updated.id).queryKey, updated);
      await queryClient.invalidateQueries({ queryKey: spanQueries.all() });
      setPending(null);
      setReason('');
      setError(null);
      setDone(action === 'approve' ? 'Approved.' : action === 'return' ? 'Sent back to the surveyor.' : action === 'suspend' ? 'Suspended.' : 'Reinstated.');
      onDone?.(updated);
    },
    onError: async (err) => {
      if (err instanceof ApiError && err.status === 409) {
        // The span moved on (another decision, an edit): show the fresh record with the reason.
        await queryClient.invalidateQueries({ queryKey: spanQueries.detail(span.id).queryKey });
      }
      setError(err instanceof ApiError ? (err.issueFor('reason') ?? err.message) : 'The decision was not recorded; try again.');
    },
  });

  const system = useMe().unitSystem;
  // The server refuses approval when no active pair passes every blocking gate; the page says why before anyone tries.
  const failing = span.perchable === false ? (span.failingGates ?? []) : [];
  const actions = availableActions(span, roles).filter((a) => !(a === 'approve' && failing.length));
  if (!actions.length && !done) return null;

  return (
    <section className="card space-y-3" aria-labelledby="decide-title">
      <h2 id="decide-title" className="text-lg font-bold">Safety decision</h2>
      {done && <p role="status" className="font-semibold text-go">{done}</p>}
      {failing.length > 0 && span.status === 'submitted' && (
        <div role="alert" className="rounded-lg border border-alarm bg-chalk p-3 text-sm" data-testid="span-failing-gates">
          <p className="font-semibold text-alarm">Cannot be approved: no active drone and harvester pass {failing.length === 1 ? 'this gate' : 'these gates'}</p>
          <ul className="mt-1 list-disc pl-5">
            {failing.map((g) => (
              <li key={g.id}><strong>{g.label}</strong>{g.detail ? ` — ${gateDetail(g, system)}` : ''}</li>
            ))}
          </ul>
          <p className="mt-1">Send it back to the surveyor with what to re-measure.</p>
        </div>
      )}
      <div className="flex flex-wrap gap-3">
        {actions.map((a) => (
          <button
            key={a}
            type="button"
            className={ACTIONS[a].className}
            disabled={run.isPending}
            aria-expanded={ACTIONS[a].needsReason ? pending === a : undefined}
            onClick={() => {
              setError(null);
              setDone(null);
              if (ACTIONS[a].needsReason) setPending(pending === a ? null : a);
              else run.mutate({ action: a });
            }}
          >
            {ACTIONS[a].label}
          </button>
        ))}
      </div>
      {pending && ACTIONS[pending].needsReason && (
        <form
          className="space-y-2"
          onSubmit={(e) => {
            e.preventDefault();
            if (!reason.trim()) return setError('Give a reason');
            run.mutate({ action: pending, reason: reason.trim() });
          }}
        >
          <label className="field-label" htmlFor="decision-reason">
            {pending === 'return' ? 'What should the surveyor fix?' : 'Why is this span suspended?'}
          </label>
          <textarea id="decision-reason" className="field-input" rows={3} value={reason} onChange={(e) => setReason(e.target.value)} maxLength={2000} />
          <button type="submit" className={pending === 'suspend' ? 'btn-danger' : 'btn-primary'} disabled={run.isPending}>
            {ACTIONS[pending].confirm}
          </button>
        </form>
      )}
      {error && <p className="field-error" role="alert">{error}</p>}
    </section>
  );
}
