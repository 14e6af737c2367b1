// Order of the surveyor's queue: what needs their hands first.
import type { Span, SpanStatus } from '#shared/schemas/inventory.ts';

export const QUEUE_GROUPS: { id: string; title: string; statuses: SpanStatus[]; empty?: string }[] = [
  { id: 'returned', title: 'Sent back to you', statuses: ['returned'] },
  { id: 'draft', title: 'Drafts', statuses: ['draft'] },
  { id: 'done', title: 'Submitted and approved', statuses: ['submitted', 'approved', 'suspended'] },
];

/** Groups the spans in queue order; within a group the most recently changed first. */
export function groupQueue(spans: readonly Span[]) {
  return QUEUE_GROUPS.map((g) => ({
    ...g,
    spans: spans.filter((s) => g.statuses.includes(s.status)).sort((a, b) => b.updatedAt.localeCompare(a.updatedAt)),
  }));
}
