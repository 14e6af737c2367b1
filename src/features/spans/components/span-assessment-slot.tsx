// ASSESSMENT SLOT: the assessment feature replaces the body of this component with its full breakdown
// (gates, factors, charts). Until then it shows the basics the span record carries.
import type { Span } from '#shared/schemas/inventory.ts';
import { formatQuantity, type UnitSystem } from '#shared/units.ts';
import { Caution } from '../../../components/caution.tsx';

export function SpanAssessmentSlot({ span, unitSystem }: { span: Span; unitSystem: UnitSystem }) {
  const a = span.assessment;
  if (!a) return <p className="text-ink-700">Not assessed yet.</p>;
  return (
    <div className="space-y-3" data-slot="span-assessment">
      <dl className="grid grid-cols-2 gap-3 sm:grid-cols-4">
        <div>
          <dt className="text-sm text-ink-700">Perchable</dt>
          <dd className={`text-lg font-bold ${a.perchable ? 'text-go' : 'text-alarm'}`}>{a.perchable ? 'Yes' : 'No'}</dd>
        </div>
        <div>
          <dt className="text-sm text-ink-700">Score</dt>
          <dd className="text-lg font-bold">{Math.round(a.score)} / 100</dd>
        </div>
        <div>
          <dt className="text-sm text-ink-700">Harvestable power</dt>
          <dd className="text-lg font-bold">{formatQuantity(a.harvestW, 'power', unitSystem)}</dd>
        </div>
        {a.conductorTempC != null && (
          <div>
            <dt className="text-sm text-ink-700">Conductor temperature</dt>
            <dd className="text-lg font-bold">{formatQuantity(a.conductorTempC, 'temperature', unitSystem)}</dd>
          </div>
        )}
      </dl>
      {a.gates && a.gates.some((g) => !g.passed) && (
        <ul className="list-disc pl-5 text-sm">
          {a.gates.filter((g) => !g.passed).map((g) => (
            <li key={g.id} className="text-alarm">{g.detail || g.id}</li>
          ))}
        </ul>
      )}
      <Caution compact />
    </div>
  );
}
