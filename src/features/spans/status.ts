// The one place in the UI that says how a span status reads and looks; every badge, filter and queue uses it.
// The words come from the shared inventory schema, so exports and screens say the same thing.
import { SPAN_STATUSES, SPAN_STATUS_LABELS, type SpanStatus } from '#shared/schemas/inventory.ts';

export { SPAN_STATUSES, type SpanStatus };

interface StatusLook {
  label: string;
  /** One sentence for tooltips and the queue: what the status means for the person looking. */
  hint: string;
  /** Tailwind classes for the badge (colours from the Roostline theme in src/index.css). */
  badge: string;
  /** A small glyph so the status never relies on colour alone. */
  glyph: string;
}

export const SPAN_STATUS_LOOK: Record<SpanStatus, StatusLook> = {
  draft: { label: SPAN_STATUS_LABELS.draft, hint: 'Still being surveyed; only its surveyor changes it.', badge: 'bg-ink-50 text-ink-800 border-ink-200', glyph: '✎' },
  submitted: { label: SPAN_STATUS_LABELS.submitted, hint: 'Sent to the safety desk for a decision.', badge: 'bg-brass-100 text-brass-700 border-brass-300', glyph: '…' },
  approved: { label: SPAN_STATUS_LABELS.approved, hint: 'A safety officer approved it for perching.', badge: 'bg-green-50 text-go border-green-300', glyph: '✓' },
  returned: { label: SPAN_STATUS_LABELS.returned, hint: 'The reviewer asked the surveyor to fix something.', badge: 'bg-red-50 text-alarm border-red-300', glyph: '↩' },
  suspended: { label: SPAN_STATUS_LABELS.suspended, hint: 'Approved before, now withdrawn by safety until reinstated.', badge: 'bg-ink-900 text-chalk border-ink-900', glyph: '||' },
};

export function statusLabel(status: string): string {
  return (SPAN_STATUS_LOOK as Record<string, StatusLook | undefined>)[status]?.label ?? status;
}

export function isSpanStatus(value: string): value is SpanStatus {
  return (SPAN_STATUSES as readonly string[]).includes(value);
}
