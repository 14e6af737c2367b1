// The header's connection mark: online, offline or sending, with the number of writes waiting on this device.
import { Link, useLocation } from 'react-router';
import { useOnline } from '../../lib/online.ts';
import { useOutbox } from '../../lib/use-outbox.ts';

export function ConnectionIndicator({ userId }: { userId: string }) {
  const online = useOnline();
  const outbox = useOutbox();
  const location = useLocation();
  const mine = outbox.items.filter((i) => i.userId === userId);
  const waiting = mine.length;
  const stuck = mine.filter((i) => i.state === 'failed' || i.state === 'conflict').length;
  let tone = 'border-ink-500 text-ink-100';
  let dot = 'bg-go';
  let words = 'Online';
  if (!online) {
    tone = 'border-brass-500 bg-brass-500 text-ink-900';
    dot = 'bg-ink-900';
    words = 'Offline';
  } else if (outbox.needsSignIn && waiting) {
    tone = 'border-brass-500 bg-brass-100 text-ink-900';
    dot = 'bg-alarm';
    words = 'Sign in to send';
  } else if (outbox.sending) {
    tone = 'border-brass-300 text-chalk';
    dot = 'bg-brass-300 animate-pulse';
    words = 'Sending';
  } else if (stuck) {
    tone = 'border-alarm bg-red-50 text-ink-900';
    dot = 'bg-alarm';
    words = 'Needs you';
  }
  const target = outbox.needsSignIn && waiting && online ? `/sign-in?ended=1&next=${encodeURIComponent(location.pathname)}` : '/field/outbox';
  return (
    <Link
      to={target}
      className={`inline-flex min-h-11 items-center gap-2 rounded-full border-2 px-3 py-1 text-sm font-semibold ${tone}`}
      data-testid="connection"
      data-state={!online ? 'offline' : outbox.sending ? 'sending' : 'online'}
      data-waiting={waiting}
      aria-label={`${words}${waiting ? `, ${waiting} waiting to send` : ''}. Open the field outbox.`}
    >
      <span className={`h-2.5 w-2.5 rounded-full ${dot}`} aria-hidden="true" />
      <span>{words}</span>
      {waiting > 0 && <span className="rounded-full bg-ink-900 px-2 text-chalk" data-testid="waiting-count">{waiting}</span>}
    </Link>
  );
}
