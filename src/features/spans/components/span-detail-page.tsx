// One span with everything known about it: fields in the user's units, hazards, assessment, photos, decisions, history.
import type { ReactNode } from 'react';
import { Link, useParams } from 'react-router';
import { useQuery } from '@tanstack/react-query';
import { TERRAIN_LABELS, type Span } from '#shared/schemas/inventory.ts';
import { formatQuantity } from '#shared/units.ts';
import { Caution } from '../../../components/caution.tsx';
import { useMe } from '../../auth/queries.ts';
import { codeWords, date } from '../../../lib/format.ts';
import { inventoryQueries, spanQueries } from '../queries.ts';
import { LifecycleActions } from './lifecycle-actions.tsx';
import { SpanAssessmentSlot } from './span-assessment-slot.tsx';
import { StatusBadge } from './status-badge.tsx';
import { SpanHistoryList } from './span-history-list.tsx';

/** Where the photos feature shows the span's photos (composed in src/app/router.tsx). */
export type SpanPhotosSlot = (span: Span) => ReactNode;
/** Where the load-evidence feature flags what flights measured on the span (composed in src/app/router.tsx). */
export type SpanEvidenceSlot = (span: Span) => ReactNode;

function Item({ label, children }: { label: string; children: ReactNode }) {
  return (
    <div>
      <dt className="text-sm text-ink-700">{label}</dt>
      <dd className="font-semibold">{children}</dd>
    </div>
  );
}

export function SpanDetailPage({ photosSlot, evidenceSlot }: { photosSlot?: SpanPhotosSlot; evidenceSlot?: SpanEvidenceSlot }) {
  const { id = '' } = useParams();
  const me = useMe();
  const system = me.unitSystem;
  const q = useQuery(spanQueries.detail(id));
  const history = useQuery(spanQueries.history(id));
  const kinds = useQuery(inventoryQueries.hazardKinds());
  const lines = useQuery(inventoryQueries.lines());
  if (q.isPending) return <p className="p-8 text-center text-ink-700">Loading the span…</p>;
  if (q.error) throw q.error;
  const span = q.data;
  const line = lines.data?.find((l) => l.id === span.lineId);
  const c = span.conductor;
  const kindLabel = (kid: string) => kinds.data?.find((k) => k.id === kid)?.label ?? kid;
  const surveyorMayEdit = me.roles.includes('surveyor') && ['draft', 'returned', 'approved'].includes(span.status);

  return (
    <article className="space-y-4" aria-labelledby="span-title">
      <header className="space-y-2">
        <Link to="/spans" className="text-sm font-semibold text-ink-700 underline">← Spans</Link>
        <div className="flex flex-wrap items-center gap-3">
          <h1 id="span-title" className="page-title">
            Span {span.fromStructureLabel} → {span.toStructureLabel}
          </h1>
          <StatusBadge status={span.status} />
          <span className="text-sm text-ink-700">version {span.version}</span>
          {surveyorMayEdit && (
            <Link to={`/field/spans/${span.id}/edit`} className="btn-ghost ml-auto">
              Edit
            </Link>
          )}
        </div>
        {span.status === 'returned' && span.returnReason && (
          <p className="rounded-lg border-2 border-alarm bg-red-50 p-3"><strong className="text-alarm">Sent back:</strong> {span.returnReason}</p>
        )}
        {span.status === 'suspended' && span.suspendReason && (
          <p className="rounded-lg border-2 border-ink-900 bg-ink-50 p-3"><strong>Suspended:</strong> {span.suspendReason}</p>
        )}
      </header>

      <LifecycleActions span={span} roles={me.roles} />

      {evidenceSlot?.(span)}

      <section className="card space-y-3" aria-labelledby="sec-record">
        <h2 id="sec-record" className="text-lg font-bold">Survey record</h2>
        <dl className="grid grid-cols-2 gap-4 md:grid-cols-4">
          <Item label="Line">{span.lineName}{line ? ` · ${line.voltageKv} kV · ${line.frequencyHz} Hz` : ''}</Item>
          <Item label="Length (geodesic)">{formatQuantity(span.lengthM, 'length', system)}</Item>
          <Item label="Conductor">{c ? (c.codeWord ? `${c.codeWord}${c.size ? ` (${c.size})` : ''}` : c.size ?? 'custom') : '—'}</Item>
          <Item label="Material">{c?.material ?? '—'}</Item>
          <Item label="Outside diameter">{formatQuantity(c?.diameterMm, 'diameter', system)}</Item>
          <Item label="Phase / position">{span.phasePosition ?? '—'}</Item>
          <Item label="Terrain">{span.terrain ? TERRAIN_LABELS[span.terrain] : '—'}</Item>
          <Item label="Load current">
            {formatQuantity(span.loadCurrentA, 'current', system)} <span className="font-normal text-ink-700">({span.loadCurrentSource === 'line' ? "the line's estimate" : 'surveyed'})</span>
          </Item>
          <Item label="Clearance at the perch point">{formatQuantity(span.clearanceM, 'length', system)}</Item>
          <Item label="Lowest clearance">{formatQuantity(span.lowestClearanceM, 'length', system)}</Item>
          <Item label="Lowest clearance measured at">
            {span.lowestClearanceAlongM === null ? 'Not recorded' : `${formatQuantity(span.lowestClearanceAlongM, 'length', system)} from ${span.fromStructureLabel}`}
          </Item>
          <Item label="Survey date">{date(span.surveyDate)}</Item>
          <Item label="Submitted / approved">
            {date(span.submittedAt)} / {date(span.approvedAt)}
          </Item>
        </dl>
        <Caution compact />
      </section>

      <section className="card space-y-3" aria-labelledby="sec-hazards">
        <h2 id="sec-hazards" className="text-lg font-bold">Hazards ({span.hazards.length})</h2>
        {span.hazards.length === 0 ? (
          <p className="text-ink-700">None recorded.</p>
        ) : (
          <table className="w-full text-left text-sm">
            <thead>
              <tr className="border-b border-ink-200">
                <th className="py-2 pr-3">Kind</th>
                <th className="py-2 pr-3">Severity</th>
                <th className="py-2 pr-3">Position from the from-structure</th>
                <th className="py-2">Note</th>
              </tr>
            </thead>
            <tbody>
              {span.hazards.map((h) => (
                <tr key={h.id} className="border-b border-ink-100">
                  <td className="py-2 pr-3 font-semibold">{kindLabel(h.kindId)}</td>
                  <td className={`py-2 pr-3 ${h.severity === 'high' ? 'font-bold text-alarm' : ''}`}>{codeWords(h.severity)}</td>
                  <td className="py-2 pr-3">{h.positionAlongM == null ? 'whole span' : formatQuantity(h.positionAlongM, 'length', system)}</td>
                  <td className="py-2">{h.note || '—'}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>

      <section className="card space-y-3" aria-labelledby="sec-assessment">
        <h2 id="sec-assessment" className="text-lg font-bold">Assessment</h2>
        <SpanAssessmentSlot span={span} unitSystem={system} />
      </section>

      {/* PHOTOS SLOT: the photos feature shows the span's photos here (passed in from src/app/router.tsx). */}
      {photosSlot && (
        <section className="card space-y-3" aria-labelledby="sec-photos" data-slot="span-photos">
          <h2 id="sec-photos" className="text-lg font-bold">Photos ({span.photoIds.length})</h2>
          {photosSlot(span)}
        </section>
      )}

      {history.data && history.data.length > 0 && (
        <section className="card space-y-3" aria-labelledby="sec-history">
          <h2 id="sec-history" className="text-lg font-bold">History</h2>
          <SpanHistoryList spanId={span.id} system={system} />
        </section>
      )}
    </article>
  );
}
