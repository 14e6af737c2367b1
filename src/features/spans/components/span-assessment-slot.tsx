// ASSESSMENT SLOT: the assessment feature's full breakdown (gates, factors, harvest figures, charts).
import type { Span } from '#shared/schemas/inventory.ts';
import type { UnitSystem } from '#shared/units.ts';
import { SpanAssessmentPanel } from '../../assessment/span-assessment-panel.tsx';

export function SpanAssessmentSlot({ span }: { span: Span; unitSystem: UnitSystem }) {
  return <SpanAssessmentPanel spanId={span.id} />;
}
