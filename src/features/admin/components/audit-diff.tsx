import type { AuditItem } from '#shared/schemas/accounts.ts';

function show(v: unknown): string {
  if (v === null || v === undefined) return '—';
  if (Array.isArray(v)) return v.every((x) => typeof x !== 'object') ? v.join(', ') || '(none)' : JSON.stringify(v);
  if (typeof v === 'object') return JSON.stringify(v);
  if (typeof v === 'boolean') return v ? 'yes' : 'no';
  return String(v);
}

const BOOKKEEPING = new Set(['version', 'updatedAt', 'createdAt']);

const isRecord = (v: unknown): v is Record<string, unknown> => !!v && typeof v === 'object' && !Array.isArray(v);

/** The fields an audit entry changed, before → after (unchanged fields are left out). */
export function auditChanges(before: unknown, after: unknown): { field: string; before: string; after: string }[] {
  if (!isRecord(before) && !isRecord(after)) {
    if (before === null && after === null) return [];
    return [{ field: 'value', before: show(before), after: show(after) }];
  }
  const b = isRecord(before) ? before : {};
  const a = isRecord(after) ? after : {};
  const keys = [...new Set([...Object.keys(b), ...Object.keys(a)])];
  const changed = keys.filter((k) => JSON.stringify(b[k]) !== JSON.stringify(a[k]));
  // Version and timestamps change on every write: shown only when nothing else did.
  const meaningful = changed.filter((k) => !BOOKKEEPING.has(k));
  return (meaningful.length ? meaningful : changed).map((k) => ({ field: k, before: k in b ? show(b[k]) : '—', after: k in a ? show(a[k]) : '—' }));
}

export function AuditDiff({ entry }: { entry: Pick<AuditItem, 'before' | 'after'> }) {
  const changes = auditChanges(entry.before, entry.after);
  if (changes.length === 0) return <p className="text-sm text-ink-500">No field changes recorded.</p>;
  return (
    <table className="w-full text-sm" aria-label="Changes">
      <thead className="sr-only">
        <tr><th>Field</th><th>Before</th><th>After</th></tr>
      </thead>
      <tbody>
        {changes.map((c) => (
          <tr key={c.field} className="align-top">
            <th scope="row" className="py-0.5 pr-3 text-left font-semibold text-ink-800">{c.field}</th>
            <td className="py-0.5 pr-2 break-all text-alarm line-through decoration-1">{c.before}</td>
            <td className="px-1 py-0.5 text-ink-500" aria-hidden>→</td>
            <td className="py-0.5 break-all text-go">{c.after}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

const ACTION_LABELS: Record<string, string> = {
  'invitation.create': 'Invited',
  'invitation.resend': 'Sent the invitation again',
  'invitation.revoke': 'Withdrew the invitation',
  'invitation.accept': 'Accepted the invitation',
  'user.update': 'Changed the account',
  'user.deactivate': 'Deactivated the account',
  'user.reactivate': 'Reactivated the account',
  'crew.create': 'Created the crew',
  'crew.update': 'Renamed the crew',
  'crew.delete': 'Deleted the crew',
  'account.update': 'Changed own settings',
  'account.password-change': 'Changed own password',
  'account.password-reset-request': 'Asked for a password reset',
  'account.password-reset': 'Reset the password',
};

export function actionLabel(action: string) {
  return ACTION_LABELS[action] ?? action;
}
