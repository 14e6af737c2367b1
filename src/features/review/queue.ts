import type { Span, SpanStatus } from '#shared/schemas/inventory.ts';
import type { UnitSystem } from '#shared/units.ts';
import { gateDetail } from '../../lib/format.ts';

export type QueueKind = 'submitted' | 'decision' | 'approved' | 'suspended';

export const QUEUES: { kind: QueueKind; label: string; hint: string }[] = [
  { kind: 'submitted', label: 'Waiting for review', hint: 'oldest first' },
  { kind: 'decision', label: 'Needs a decision', hint: 'approved, now failing a gate: suspend or return' },
  { kind: 'approved', label: 'Approved', hint: 'suspend one that is no longer safe' },
  { kind: 'suspended', label: 'Suspended', hint: 'reinstate when cleared' },
];

/** What a queue lists: "needs a decision" is the approved spans that no longer pass their gates. */
export function queueFilter(kind: QueueKind): { status: SpanStatus; perchable?: boolean } {
  return kind === 'decision' ? { status: 'approved', perchable: false } : { status: kind };
}

/** The status of the spans a queue lists. */
export const queueStatus = (kind: QueueKind): SpanStatus => queueFilter(kind).status;

/** When a span entered the queue it is in: submission for the review queue, the last change otherwise. */
export function queuedSince(span: Pick<Span, 'submittedAt' | 'approvedAt' | 'updatedAt'>, status: SpanStatus): string {
  if (status === 'submitted') return span.submittedAt ?? span.updatedAt;
  if (status === 'approved') return span.approvedAt ?? span.updatedAt;
  return span.updatedAt;
}

/** Oldest in the queue first: the spans that have waited longest come up first. */
export function orderQueue<T extends Pick<Span, 'submittedAt' | 'approvedAt' | 'updatedAt' | 'id'>>(spans: T[], status: SpanStatus): T[] {
  return [...spans].sort((a, b) => queuedSince(a, status).localeCompare(queuedSince(b, status)) || a.id.localeCompare(b.id));
}

/** "waiting 3 d", "waiting 5 h", "waiting 12 min". */
export function waitingFor(sinceIso: string, now = Date.now()): string {
  const s = Math.max(0, (now - new Date(sinceIso).getTime()) / 1000);
  if (s < 3600) return `${Math.max(1, Math.floor(s / 60))} min`;
  if (s < 86400) return `${Math.floor(s / 3600)} h`;
  return `${Math.floor(s / 86400)} d`;
}

/** The key a reviewer pressed, as a desk command; typing in a field is never a command (except Escape). */
export type DeskCommand = 'next' | 'previous' | 'approve' | 'return' | 'suspend' | 'reinstate' | 'cancel';

export function commandForKey(e: { key: string; ctrlKey?: boolean; metaKey?: boolean; altKey?: boolean }, typing: boolean): DeskCommand | null {
  if (e.key === 'Escape') return 'cancel';
  if (typing || e.ctrlKey || e.metaKey || e.altKey) return null;
  switch (e.key) {
    case 'j':
    case 'ArrowDown':
      return 'next';
    case 'k':
    case 'ArrowUp':
      return 'previous';
    case 'a':
      return 'approve';
    case 'r':
      return 'return';
    case 's':
      return 'suspend';
    case 'u':
      return 'reinstate';
    default:
      return null;
  }
}

/** A queue row's mark for a span whose harvest is too low to be useful for every active pair (its useful-harvest
 * gate fails), in words and the reader's units; null when the harvest is enough or not assessed. */
export function lowHarvestMark(span: Pick<Span, 'failingGates'>, system: UnitSystem): string | null {
  const gate = span.failingGates?.find((g) => g.id === 'useful-harvest');
  if (!gate) return null;
  const detail = gateDetail(gate, system);
  return `Harvest too low to be useful${detail ? `: ${detail}` : ''}`;
}
