// What the load-evidence feature renders in other features' span slots (wired in src/app/router.tsx).
import type { ReactNode } from 'react';
import type { Span } from '#shared/schemas/inventory.ts';
import { SpanEvidenceFlag } from './components/span-evidence-flag.tsx';

/** Review desk and span page: the measured-harvest flag (nothing when no flight has measured the span). */
export function spanEvidenceSlot(span: Span): ReactNode {
  return <SpanEvidenceFlag spanId={span.id} lineName={span.lineName} />;
}
