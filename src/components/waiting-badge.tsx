// The mark on anything kept on the device and not yet sent: a dashed brass pill with a clock hand, in words.
/** Marks a record whose latest entries are only on this device so far. */
export function WaitingBadge() {
  return (
    <span className="inline-flex items-center gap-1 rounded-full border-2 border-dashed border-brass-600 bg-brass-100 px-3 py-0.5 text-sm font-semibold text-ink-900">
      <svg viewBox="0 0 16 16" className="h-4 w-4" aria-hidden="true"><path d="M8 2v6l3 2" stroke="currentColor" strokeWidth="2" fill="none" strokeLinecap="round" /></svg>
      Waiting to send
    </span>
  );
}
