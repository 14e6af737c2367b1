import { lazy, Suspense, useState } from 'react';
import { Link } from 'react-router';
import { useQuery, useQueryClient } from '@tanstack/react-query';
import { Bar, BarChart, CartesianGrid, ReferenceLine, ResponsiveContainer, Scatter, ScatterChart, Tooltip, XAxis, YAxis } from 'recharts';
import { formatQuantity } from '#shared/units.ts';
import { useMe } from '../../auth/queries.ts';
import { ProgressBar } from '../../../components/progress-bar.tsx';
import { flightApi, type FlightRecordView } from '../api.ts';
import { residualsByLine } from '../charts-data.ts';
import { stopLabel } from '../flight-map-data.ts';
import { count, writtenTime } from '../format.ts';

// The map library is large: the flight map loads in its own chunk when a record is shown.
const FlightMap = lazy(() => import('./flight-map.tsx'));

/** Flight records: upload one, see its stops on the track, and every perch's measured harvest against the prediction. */
export function FlightRecordsSection({ canUpload }: { canUpload: boolean }) {
  const me = useMe();
  const qc = useQueryClient();
  const perches = useQuery({ queryKey: ['evidence', 'perches'], queryFn: () => flightApi.perches() });
  const records = useQuery({ queryKey: ['evidence', 'flights'], queryFn: async () => (await flightApi.list()).items });
  const [progress, setProgress] = useState<number | null | undefined>(undefined);
  const [error, setError] = useState<string | null>(null);
  const [record, setRecord] = useState<FlightRecordView | null>(null);

  const onFile = async (file: File | undefined) => {
    if (!file) return;
    setError(null);
    setProgress(0);
    try {
      const r = await flightApi.upload(file, (p) => setProgress(p.fraction));
      setRecord(r);
      await qc.invalidateQueries({ queryKey: ['evidence', 'perches'] });
      await qc.invalidateQueries({ queryKey: ['evidence', 'flights'] });
    } catch (e) {
      setError((e as Error).message);
    } finally {
      setProgress(undefined);
    }
  };

  const points = (perches.data?.items ?? []).filter((p) => p.measuredW !== null && p.predictedW !== null).map((p) => ({ x: round1(p.predictedW!), y: round1(p.measuredW!), line: p.lineName ?? '' }));
  const top = Math.max(10, ...points.flatMap((p) => [p.x, p.y])) * 1.1;
  const residuals = residualsByLine(perches.data?.items ?? []);
  return (
    <section className="card space-y-3" aria-labelledby="flights">
      <h2 id="flights" className="text-lg font-bold">Flight records</h2>
      <p className="text-sm text-ink-700">
        A CSV (<a className="underline" href="/api/flight-records/template.csv">template</a>) or a GPX 1.1 track. A stop of more than a minute within a few metres is a perch when it sits next to an approved span and harvests; otherwise it is listed as a hover.
      </p>
      {canUpload && (
        <label className="block">
          <span className="field-label">Upload a flight record</span>
          <input type="file" accept=".csv,.gpx,text/csv,application/gpx+xml" className="field-input" onChange={(e) => onFile(e.target.files?.[0])} />
        </label>
      )}
      {progress !== undefined && <ProgressBar label="Uploading the flight record" value={progress} />}
      {error && <p role="alert" className="field-error">{error}</p>}
      {record && <FlightRecordResult record={record} />}
      {(records.data?.length ?? 0) > 0 && (
        <details className="rounded-lg border border-ink-100 p-3">
          <summary className="cursor-pointer font-semibold">Flight records uploaded ({records.data!.length})</summary>
          <ul className="mt-2 space-y-1 text-sm">
            {records.data!.slice(0, 50).map((r) => (
              <li key={r.id}>
                <Link className="font-semibold underline" to={`/evidence/flights/${r.id}`}>{r.fileName}</Link> · {writtenTime(r.startedAt)} · {r.pointCount.toLocaleString('en-US')} points
              </li>
            ))}
          </ul>
        </details>
      )}
      <div className="grid gap-4 lg:grid-cols-2">
        <div>
          <h3 className="font-semibold">Measured against predicted harvest</h3>
          {points.length === 0 ? (
            <p className="text-sm">No perches with a measured harvest yet.</p>
          ) : (
            <div className="h-72" aria-label="Measured against predicted harvest">
              <ResponsiveContainer width="100%" height="100%">
                <ScatterChart margin={{ left: 4, right: 16, top: 8, bottom: 16 }}>
                  <CartesianGrid strokeDasharray="3 3" />
                  <XAxis type="number" dataKey="x" name="Predicted" unit=" W" domain={[0, Math.ceil(top)]} label={{ value: 'Predicted', position: 'insideBottom', offset: -8, fontSize: 11 }} />
                  <YAxis type="number" dataKey="y" name="Measured" unit=" W" domain={[0, Math.ceil(top)]} width={64} />
                  <Tooltip formatter={(v) => `${v} W`} />
                  <ReferenceLine segment={[{ x: 0, y: 0 }, { x: Math.ceil(top), y: Math.ceil(top) }]} stroke="#3f7b83" strokeDasharray="6 3" label={{ value: '1 : 1', position: 'insideTopLeft', fontSize: 11 }} />
                  <ReferenceLine segment={[{ x: 0, y: 0 }, { x: Math.ceil(top), y: Math.ceil(top) / 2 }]} stroke="#b3261e" strokeDasharray="2 3" label={{ value: 'half', position: 'insideBottomRight', fontSize: 11, fill: '#b3261e' }} />
                  <Scatter data={points} fill="#c98f28" isAnimationActive={false} />
                </ScatterChart>
              </ResponsiveContainer>
            </div>
          )}
        </div>
        <div>
          <h3 className="font-semibold">Residuals by line (median of measured ÷ predicted − 1)</h3>
          {residuals.length === 0 ? (
            <p className="text-sm">No residuals yet.</p>
          ) : (
            <div className="h-72" aria-label="Residuals by line">
              <ResponsiveContainer width="100%" height="100%">
                <BarChart data={residuals} layout="vertical" margin={{ left: 8, right: 16, top: 4, bottom: 4 }}>
                  <CartesianGrid strokeDasharray="3 3" horizontal={false} />
                  <XAxis type="number" unit=" %" />
                  <YAxis type="category" dataKey="line" width={140} tick={{ fontSize: 11 }} />
                  <Tooltip formatter={(v, _k, item) => [`${v} % over ${(item.payload as { perches: number }).perches} perch(es)`, 'Median residual']} />
                  <ReferenceLine x={0} stroke="#12343b" />
                  <Bar dataKey="medianPct" fill="#3f7b83" isAnimationActive={false} />
                </BarChart>
              </ResponsiveContainer>
            </div>
          )}
        </div>
      </div>
      {(perches.data?.lowHarvestSpanIds.length ?? 0) > 0 && (
        <p role="status" className="font-semibold text-alarm">
          {perches.data!.lowHarvestSpanIds.length} span(s) harvested less than half the prediction:{' '}
          {perches.data!.lowHarvestSpanIds.map((id, i) => (
            <span key={id}>{i > 0 && ', '}<Link className="underline" to={`/spans/${id}`}>span {i + 1}</Link></span>
          ))}
          . A safety officer should look at them.
        </p>
      )}
      <p className="text-xs text-ink-700">Figures in {me.unitSystem === 'us' ? 'US' : 'metric'} units; harvest in watts in both.</p>
    </section>
  );
}

const round1 = (v: number) => Math.round(v * 10) / 10;

export function FlightRecordResult({ record }: { record: FlightRecordView }) {
  const me = useMe();
  return (
    <div className="space-y-2 rounded-lg border border-ink-100 p-3">
      <p role="status">
        <strong>{record.fileName}</strong>: {count(record.pointCount)} points, {writtenTime(record.startedAt)} to {writtenTime(record.endedAt)};{' '}
        {record.events.filter((e) => e.kind === 'perch').length} perch(es), {record.events.filter((e) => e.kind === 'hover').length} hover(s).
      </p>
      <Suspense fallback={<p className="text-sm text-ink-700">Loading the map…</p>}>
        <FlightMap record={record} system={me.unitSystem} />
      </Suspense>
      <table className="w-full text-sm">
        <thead>
          <tr className="text-left text-ink-700"><th>Stop</th><th>From</th><th>Span</th><th className="text-right">Predicted</th><th className="text-right">Measured</th><th className="text-right">Implied current</th><th className="text-right">Metered</th></tr>
        </thead>
        <tbody>
          {record.events.map((e, i) => (
            <tr key={e.id} className="border-t border-ink-100">
              <td className="py-1">{stopLabel(e, i)}{e.lowHarvest && <span className="ml-1 font-semibold text-alarm">below half</span>}</td>
              <td>{writtenTime(e.startAt)} · {Math.round(e.durationS / 60)} min</td>
              <td>{e.spanId ? <>{formatQuantity(e.spanDistanceM, 'length', me.unitSystem)} from <Link className="underline" to={`/spans/${e.spanId}`}>span {e.spanLabel ?? ''}</Link></> : (e.note ?? '—')}</td>
              <td className="text-right">{formatQuantity(e.predictedW, 'power', me.unitSystem)}{e.predictedSource && <span className="block text-xs text-ink-500">{e.predictedSource === 'series' ? 'metered profile' : 'load estimate'}</span>}</td>
              <td className="text-right">{formatQuantity(e.measuredW, 'power', me.unitSystem)}</td>
              <td className="text-right">{formatQuantity(e.impliedCurrentA, 'current', me.unitSystem)}</td>
              <td className="text-right">{formatQuantity(e.meteredCurrentA, 'current', me.unitSystem)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
