// The card of a span clicked on the map: its key figures and a link to the full page.
import { Link } from 'react-router';
import { useQuery } from '@tanstack/react-query';
import { formatQuantity } from '#shared/units.ts';
import { Caution } from '../../components/caution.tsx';
import { useMe } from '../auth/queries.ts';
import { spanQueries } from '../spans/queries.ts';
import { StatusBadge } from '../spans/components/status-badge.tsx';

export function SpanCard({ spanId, onClose }: { spanId: string; onClose: () => void }) {
  const me = useMe();
  const span = useQuery(spanQueries.detail(spanId));
  const s = span.data;
  const a = s?.assessment ?? null;
  return (
    <article className="card space-y-2 bg-white p-3 shadow-lg" aria-label="Span card" data-testid="span-card">
      <div className="flex items-start justify-between gap-2">
        <div>
          <h2 className="text-lg font-bold">{s ? `${s.fromStructureLabel} → ${s.toStructureLabel}` : 'Span'}</h2>
          {s && <p className="text-sm text-ink-700">{s.lineName}</p>}
        </div>
        <button type="button" className="btn-ghost min-h-10 px-3" aria-label="Close span card" onClick={onClose}>
          ✕
        </button>
      </div>
      {span.isPending && <p className="text-sm">Loading…</p>}
      {span.isError && <p role="alert" className="text-sm text-alarm">{(span.error as Error).message}</p>}
      {s && (
        <>
          <StatusBadge status={s.status} />
          <dl className="grid grid-cols-2 gap-x-3 gap-y-1 text-sm">
            <dt className="text-ink-700">Length</dt>
            <dd className="font-semibold">{formatQuantity(s.lengthM, 'length', me.unitSystem)}</dd>
            <dt className="text-ink-700">Clearance at perch</dt>
            <dd className="font-semibold">{formatQuantity(s.clearanceM, 'length', me.unitSystem)}</dd>
            <dt className="text-ink-700">Harvest power</dt>
            <dd className="font-semibold">{a ? formatQuantity(a.harvestW, 'power', me.unitSystem) : 'not assessed'}</dd>
            <dt className="text-ink-700">Perch score</dt>
            <dd className="font-semibold">{a ? `${Math.round(a.score)} / 100${a.perchable ? '' : ' · not perchable'}` : 'not assessed'}</dd>
          </dl>
          <Caution compact />
          <Link to={`/spans/${encodeURIComponent(s.id)}`} className="btn-primary inline-flex min-h-12 w-full items-center justify-center">
            Open the span
          </Link>
        </>
      )}
    </article>
  );
}
