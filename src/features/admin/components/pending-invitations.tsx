import { useEffect, useState } from 'react';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { ROLE_LABELS } from '#shared/roles.ts';
import { adminApi } from '../api.ts';
import { adminQueries } from '../queries.ts';
import { dateTime } from '../format.ts';

export function PendingInvitations() {
  const queryClient = useQueryClient();
  const { data, isPending } = useQuery(adminQueries.invitations());
  const done = () => queryClient.invalidateQueries({ queryKey: adminQueries.all });
  const [said, setSaid] = useState<string | null>(null);
  // Withdrawing asks once more in the same place: the button turns into its own confirmation for a few seconds.
  const [confirming, setConfirming] = useState<string | null>(null);
  useEffect(() => {
    if (!confirming) return;
    const t = setTimeout(() => setConfirming(null), 6000);
    return () => clearTimeout(t);
  }, [confirming]);
  const resend = useMutation({ mutationFn: adminApi.resendInvitation, onSuccess: async (_r, id) => { await done(); setSaid(`A new link went to ${data?.items.find((i) => i.id === id)?.email ?? 'the invitee'}.`); } });
  const revoke = useMutation({ mutationFn: adminApi.revokeInvitation, onSuccess: async (_r, id) => { const email = data?.items.find((i) => i.id === id)?.email; await done(); setSaid(`The invitation to ${email ?? 'the invitee'} is withdrawn; its link no longer works.`); } });
  const items = data?.items ?? [];
  return (
    <section aria-labelledby="pending-title" className="card">
      <h2 id="pending-title" className="mb-2 text-lg font-bold">Waiting for a password</h2>
      {isPending ? (
        <p className="text-ink-700">Loading…</p>
      ) : items.length === 0 ? (
        <p className="text-ink-700">No open invitations.</p>
      ) : (
        <ul className="divide-y divide-ink-100">
          {items.map((inv) => (
            <li key={inv.id} className="flex flex-wrap items-center gap-3 py-2">
              <div className="min-w-0 flex-1">
                <p className="font-semibold">{inv.name} <span className="font-normal text-ink-700">· {inv.email}</span></p>
                <p className="text-sm text-ink-700">
                  {inv.roles.map((r) => ROLE_LABELS[r]).join(', ')} · {inv.expired ? <span className="font-semibold text-alarm">link expired</span> : `link valid until ${dateTime(inv.expiresAt)}`}
                  {inv.invitedByName && ` · invited by ${inv.invitedByName}`}
                </p>
              </div>
              <button type="button" className="btn-ghost w-28" disabled={resend.isPending} onClick={() => resend.mutate(inv.id)}>Send again</button>
              <button
                type="button"
                className={`w-28 ${confirming === inv.id ? 'btn-danger' : 'btn-ghost'}`}
                disabled={revoke.isPending}
                onClick={() => (confirming === inv.id ? (setConfirming(null), revoke.mutate(inv.id)) : setConfirming(inv.id))}
              >
                {confirming === inv.id ? 'Withdraw it?' : 'Withdraw'}
              </button>
            </li>
          ))}
        </ul>
      )}
      {(resend.error || revoke.error) && <p role="alert" className="field-error">{(resend.error ?? revoke.error)!.message}</p>}
      <p role="status" className="min-h-5 text-sm text-ink-700">{said}</p>
    </section>
  );
}
