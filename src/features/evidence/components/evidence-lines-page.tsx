import { Link } from 'react-router';
import { useQuery } from '@tanstack/react-query';
import { formatQuantity } from '#shared/units.ts';
import { useMe } from '../../auth/queries.ts';
import { evidenceQueries } from '../queries.ts';
import { count, writtenTime } from '../format.ts';
import { FlightRecordsSection } from './flight-records-section.tsx';

/** Every line with what metered evidence it has. */
export function EvidenceLinesPage() {
  const me = useMe();
  const lines = useQuery(evidenceQueries.lines());
  const summaries = useQuery(evidenceQueries.summaries());
  const byLine = new Map((summaries.data ?? []).map((s) => [s.lineId, s]));
  return (
    <div className="space-y-4">
    <section className="card" aria-labelledby="evidence-lines">
      <h1 id="evidence-lines" className="mb-2 text-xl font-bold">Load evidence by line</h1>
      {lines.isPending && <p>Loading…</p>}
      {lines.error && <p role="alert" className="field-error">{lines.error.message}</p>}
      <table className="w-full text-sm">
        <thead>
          <tr className="text-left text-ink-700"><th className="py-1">Line</th><th>Voltage</th><th>Load estimate</th><th>Metered series</th></tr>
        </thead>
        <tbody>
          {(lines.data ?? []).map((l) => {
            const s = byLine.get(l.id);
            return (
              <tr key={l.id} className="border-t border-ink-100">
                <td className="py-2"><Link className="font-semibold underline" to={`/evidence/lines/${l.id}`}>{l.name}</Link></td>
                <td>{formatQuantity(l.voltageKv, 'voltage', me.unitSystem)}</td>
                <td>{formatQuantity(l.loadTypicalA, 'current', me.unitSystem)} typical</td>
                <td>{s ? `${count(s.readingCount)} readings, ${writtenTime(s.firstAt)} to ${writtenTime(s.lastAt)}` : 'none'}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </section>
    <FlightRecordsSection canUpload={me.roles.some((r) => r === 'planner' || r === 'safety' || r === 'admin')} />
    </div>
  );
}
