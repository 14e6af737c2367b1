// One flight record: its track and stops, each perch with the span it matched and its figures.
import { Link, useParams } from 'react-router';
import { useQuery } from '@tanstack/react-query';
import { Caution } from '../../../components/caution.tsx';
import { flightApi } from '../api.ts';
import { FlightRecordResult } from './flight-records-section.tsx';

export function FlightRecordPage() {
  const { id = '' } = useParams();
  const q = useQuery({ queryKey: ['evidence', 'flight', id], queryFn: () => flightApi.get(id) });
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-baseline gap-3">
        <Link to="/evidence" className="underline">Load evidence</Link>
        <h1 className="text-2xl font-bold">Flight record{q.data ? ` ${q.data.fileName}` : ''}</h1>
      </div>
      {q.isPending && <p className="text-ink-700">Loading the flight record…</p>}
      {q.error && <p role="alert" className="field-error">{q.error.message}</p>}
      {q.data && (
        <section className="card space-y-3">
          <FlightRecordResult record={q.data} />
          <Caution compact />
        </section>
      )}
    </div>
  );
}
