import { SPAN_STATUS_LOOK, isSpanStatus } from '../status.ts';

export function StatusBadge({ status }: { status: string }) {
  const look = isSpanStatus(status) ? SPAN_STATUS_LOOK[status] : null;
  return (
    <span
      data-status={status}
      title={look?.hint}
      className={`inline-flex items-center gap-1 whitespace-nowrap rounded-full border px-2.5 py-0.5 text-xs font-semibold ${look?.badge ?? 'border-ink-200 bg-white text-ink-700'}`}
    >
      <span aria-hidden="true">{look?.glyph ?? '?'}</span>
      {look?.label ?? status}
    </span>
  );
}
