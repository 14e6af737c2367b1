// Screens whose work only the server can do (README Decisions, "Offline field work"): with no signal they say so in
// plain words instead of failing. Opened offline, the notice stands in for the screen; if the signal drops while
// the screen is open, it stays on screen (nothing typed is lost) but cannot be used until the signal returns.
import { useRef, type ReactNode } from 'react';
import { Link } from 'react-router';
import { useOnline } from '../lib/online.ts';

export function NeedsNetwork({ what, why, children }: { /** The screen, as the user calls it: "The review desk". */ what: string; /** What only the server can do there. */ why: string; children: ReactNode }) {
  const online = useOnline();
  // Whether the screen was ever shown: then it stays mounted through a drop in signal.
  const shown = useRef(false);
  if (online) shown.current = true;
  const notice = (
    <section role="status" aria-live="polite" aria-label="Needs the network" data-testid="needs-network" className="rounded-xl border-2 border-brass-500 bg-brass-100 p-4 text-ink-900">
      <h2 className="text-lg font-bold">{what} needs the network</h2>
      <p className="mt-1">
        There is no connection right now. {why} It opens again by itself when the signal is back.
      </p>
      <p className="mt-2">
        Field work goes on offline: your <Link to="/field" className="font-semibold underline">field queue</Link>, span forms and photos are kept on this device and
        sent later (<Link to="/field/outbox" className="font-semibold underline">field outbox</Link>).
      </p>
    </section>
  );
  if (!online && !shown.current) return <div className="mx-auto max-w-2xl py-6">{notice}</div>;
  // One shape online and offline, so the screen below stays the same mounted screen through a drop in signal.
  return (
    <div className={online ? undefined : 'space-y-3'}>
      {!online && <div className="sticky top-2 z-20">{notice}</div>}
      {/* Kept as it was (a half-filled form is not lost) but out of reach until the signal returns. */}
      <div inert={!online} className={online ? undefined : 'opacity-50'} data-testid={online ? undefined : 'needs-network-paused'}>
        {children}
      </div>
    </div>
  );
}
