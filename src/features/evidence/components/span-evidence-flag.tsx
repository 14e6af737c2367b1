// What the fleet measured on a span, where people decide (review desk, span page): a flag in words when perches
// harvested below half the prediction, with a link to the evidence; a quiet line when the measurements agree.
import { Link } from 'react-router';
import { useQuery } from '@tanstack/react-query';
import { formatQuantity, type UnitSystem } from '#shared/units.ts';
import { useMe } from '../../auth/queries.ts';
import type { SpanEvidenceView } from '../api.ts';
import { evidenceQueries } from '../queries.ts';
import { writtenTime } from '../format.ts';

const pct = (r: number) => `${Math.round(r * 100)} %`;

/** The flag's words, separate from the query so they can be read without a server. */
export function spanEvidenceWords(ev: SpanEvidenceView, system: UnitSystem) {
  const l = ev.latest;
  const latest = l
    ? `Latest: ${writtenTime(l.startAt)}, ${formatQuantity(l.measuredW, 'power', system)} measured against ${formatQuantity(l.predictedW, 'power', system)} predicted from ${l.predictedSource === 'series' ? "the line's metered currents" : "the line's load estimate"}.`
    : null;
  const perches = (n: number) => `${n} perch${n === 1 ? '' : 'es'}`;
  if (ev.lowHarvest) {
    return {
      title: 'Measured harvest below half the prediction',
      body: `${ev.lowHarvestCount} of ${perches(ev.measuredCount)} on this span harvested less than ${pct(ev.threshold)} of the predicted power${ev.medianRatio !== null ? ` (median ${pct(ev.medianRatio)} of the prediction)` : ''}.`,
      latest,
      advice: "The harvest figures here may be too high: check the line's load estimate and the span before relying on them.",
    };
  }
  return {
    title: null,
    body: `Measured on ${perches(ev.measuredCount)}${ev.medianRatio !== null ? `: median ${pct(ev.medianRatio)} of the predicted harvest` : ''}.`,
    latest,
    advice: null,
  };
}

export function SpanEvidenceFlag({ spanId, lineName }: { spanId: string; lineName?: string }) {
  const me = useMe();
  const q = useQuery(evidenceQueries.span(spanId));
  const ev = q.data;
  if (!ev || ev.measuredCount === 0) return null;
  const words = spanEvidenceWords(ev, me.unitSystem);
  const links = (
    <p className="flex flex-wrap gap-x-4 text-sm">
      <Link className="font-semibold underline" to={`/evidence/lines/${ev.lineId}`}>Load evidence for {lineName ?? 'the line'}</Link>
      {ev.latest && <Link className="font-semibold underline" to={`/evidence/flights/${ev.latest.flightRecordId}`}>Latest flight record</Link>}
    </p>
  );
  if (!ev.lowHarvest) {
    return (
      <div className="space-y-1 rounded-lg border border-ink-100 p-3 text-sm" data-testid="harvest-evidence" aria-label="Measured harvest">
        <p>{words.body} {words.latest}</p>
        {links}
      </div>
    );
  }
  return (
    <section className="space-y-1 rounded-lg border-2 border-alarm bg-chalk p-3" data-testid="harvest-evidence-flag" aria-labelledby={`low-harvest-${spanId}`}>
      <h3 id={`low-harvest-${spanId}`} className="font-bold text-alarm">
        <span aria-hidden>▼ </span>{words.title}
      </h3>
      <p className="text-sm">{words.body} {words.latest}</p>
      <p className="text-sm">{words.advice}</p>
      {links}
    </section>
  );
}
