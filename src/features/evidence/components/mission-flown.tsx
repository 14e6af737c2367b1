// A mission's plan beside what was flown: its legs and dwells against the flight record's, on one time axis, and each
// planned perch beside the flown one. Upload a flight record to the mission here.
import { useState } from 'react';
import { Link } from 'react-router';
import { useQuery, useQueryClient } from '@tanstack/react-query';
import { Bar, BarChart, CartesianGrid, Cell, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import { duration, writtenDateTime } from '../../../lib/format.ts';
import { ProgressBar } from '../../../components/progress-bar.tsx';
import { useMe } from '../../auth/queries.ts';
import { flightApi } from '../api.ts';
import { plannedVsFlown, timelineChartData, type PlannedMission, type TimelineRow } from '../timeline-data.ts';

const COLOURS = { flight: '#3f7b83', dwell: '#c98f28' } as const;

/** "+1:05" for minutes after the planned departure, "−0:10" before it. */
function clockOffset(minutes: number): string {
  const m = Math.round(Math.abs(minutes));
  return `${minutes < 0 ? '−' : '+'}${Math.floor(m / 60)}:${String(m % 60).padStart(2, '0')}`;
}

export interface MissionForFlown {
  id: string;
  departAt?: string;
  plan: { feasible: boolean; departAt?: string; legs?: PlannedMission['legs']; perches?: PlannedMission['perches'] };
  /** Span names for the table, when the page has them. */
  perchNames?: Record<string, string>;
}

export function MissionFlown({ mission }: { mission: MissionForFlown }) {
  const me = useMe();
  const qc = useQueryClient();
  const records = useQuery({ queryKey: ['evidence', 'flights', 'mission', mission.id], queryFn: async () => (await flightApi.list({ missionId: mission.id })).items });
  const latestId = records.data?.[0]?.id;
  const record = useQuery({ queryKey: ['evidence', 'flight', latestId], queryFn: () => flightApi.get(latestId!), enabled: !!latestId });
  const [progress, setProgress] = useState<number | null | undefined>(undefined);
  const [error, setError] = useState<string | null>(null);
  const canUpload = me.roles.some((r) => r === 'planner' || r === 'safety' || r === 'admin');
  const departAt = mission.plan.departAt ?? mission.departAt;
  const planned: PlannedMission | null = mission.plan.feasible && departAt ? { departAt, legs: mission.plan.legs ?? [], perches: mission.plan.perches ?? [] } : null;

  const onFile = async (file: File | undefined) => {
    if (!file) return;
    setError(null);
    setProgress(0);
    try {
      await flightApi.upload(file, (p) => setProgress(p.fraction), { missionId: mission.id });
      await qc.invalidateQueries({ queryKey: ['evidence'] });
    } catch (e) {
      setError((e as Error).message);
    } finally {
      setProgress(undefined);
    }
  };

  return (
    <section className="card space-y-3" aria-labelledby="flown-title" data-testid="mission-flown">
      <h2 id="flown-title" className="text-lg font-bold">Planned and flown</h2>
      {records.isPending && <p className="text-sm text-ink-700">Loading the flight records…</p>}
      {records.data?.length === 0 && <p className="text-sm text-ink-700">No flight record has been uploaded for this mission yet.</p>}
      {canUpload && (
        <label className="block">
          <span className="field-label">Upload this mission's flight record (CSV or GPX)</span>
          <input type="file" accept=".csv,.gpx,text/csv,application/gpx+xml" className="field-input" onChange={(e) => onFile(e.target.files?.[0])} />
        </label>
      )}
      {progress !== undefined && <ProgressBar label="Uploading the flight record" value={progress} />}
      {error && <p role="alert" className="field-error">{error}</p>}
      {record.data && planned && <Comparison planned={planned} record={record.data} names={mission.perchNames ?? {}} />}
      {record.data && !planned && <p className="text-sm">The mission has no feasible plan to compare the flight with.</p>}
      {record.data && (
        <p className="text-sm">
          <Link className="font-semibold underline" to={`/evidence/flights/${record.data.id}`}>{record.data.fileName}</Link> on the map, with each perch's measured harvest
          {(records.data?.length ?? 0) > 1 && ` (the latest of ${records.data!.length} records for this mission)`}.
        </p>
      )}
    </section>
  );
}

function Comparison({ planned, record, names }: { planned: PlannedMission; record: Parameters<typeof plannedVsFlown>[1]; names: Record<string, string> }) {
  const c = plannedVsFlown(planned, record);
  const lo = Math.floor(Math.min(0, ...c.rows.flatMap((r) => r.segments.map((x) => x.startMin))) / 15) * 15;
  const hi = Math.ceil(Math.max(1, ...c.rows.flatMap((r) => r.segments.map((x) => x.endMin))) / 15) * 15;
  const { keys, data } = timelineChartData(c.rows, lo);
  const step = hi - lo > 240 ? 60 : 30;
  const ticks = Array.from({ length: Math.floor((hi - lo) / step) + 1 }, (_, i) => i * step);
  const late = Math.round(c.startDeltaMin);
  return (
    <div className="space-y-3">
      <p role="status">
        Took off {late === 0 ? 'on time' : `${duration(Math.abs(late))} ${late > 0 ? 'late' : 'early'}`} ({writtenDateTime(record.startedAt)}); flown {duration(c.flownDurationMin)} against {duration(c.plannedDurationMin)} planned;{' '}
        {c.perches.filter((p) => p.flownDwellS !== null && p.plannedDwellS !== null).length} of {c.perches.filter((p) => p.plannedDwellS !== null).length} planned perches flown.
      </p>
      <div className="h-44" aria-label="Planned and flown timeline" role="figure">
        <ResponsiveContainer width="100%" height="100%">
          <BarChart data={data} layout="vertical" margin={{ left: 8, right: 16, top: 4, bottom: 16 }} barCategoryGap={14}>
            <CartesianGrid strokeDasharray="3 3" horizontal={false} />
            <XAxis type="number" domain={[0, hi - lo]} ticks={ticks} tickFormatter={(v: number) => clockOffset(v + lo)} label={{ value: 'h:min from the planned departure', position: 'insideBottom', offset: -10, fontSize: 11 }} />
            <YAxis type="category" dataKey="row" width={64} />
            <Tooltip content={<SegmentTip rows={c.rows} names={names} />} cursor={false} shared={false} />
            <Bar dataKey="lead" stackId="t" fill="transparent" isAnimationActive={false} />
            {keys.map((k, i) => (
              <Bar key={k} dataKey={k} stackId="t" className="timeline-segment" isAnimationActive={false}>
                {c.rows.map((r) => (
                  <Cell key={r.row} fill={r.segments[i] ? COLOURS[r.segments[i].kind] : 'transparent'} stroke="#f7f4ee" />
                ))}
              </Bar>
            ))}
          </BarChart>
        </ResponsiveContainer>
      </div>
      <ul aria-label="Timeline legend" className="flex gap-4 text-sm">
        <li className="flex items-center gap-2"><span aria-hidden="true" className="inline-block h-3 w-6 rounded" style={{ background: COLOURS.flight }} />Flying</li>
        <li className="flex items-center gap-2"><span aria-hidden="true" className="inline-block h-3 w-6 rounded" style={{ background: COLOURS.dwell }} />Perched, charging</li>
      </ul>
      <table className="w-full text-sm">
        <thead>
          <tr className="text-left text-ink-700"><th className="py-1">Span</th><th className="text-right">Planned dwell</th><th className="text-right">Flown dwell</th><th className="text-right">Arrival against plan</th></tr>
        </thead>
        <tbody>
          {c.perches.map((p, i) => (
            <tr key={`${p.spanId}-${i}`} className="border-t border-ink-100">
              <td className="py-1">{p.spanId ? <Link className="underline" to={`/spans/${p.spanId}`}>{names[p.spanId] ?? `Perch ${i + 1}`}</Link> : `Perch ${i + 1}`}{p.plannedDwellS === null && ' (not in the plan)'}</td>
              <td className="text-right">{p.plannedDwellS === null ? '—' : duration(p.plannedDwellS / 60)}</td>
              <td className="text-right">{p.flownDwellS === null ? 'not flown' : duration(p.flownDwellS / 60)}</td>
              <td className="text-right">{p.arrivalDeltaMin === null ? '—' : Math.round(p.arrivalDeltaMin) === 0 ? 'on time' : `${duration(Math.abs(p.arrivalDeltaMin))} ${p.arrivalDeltaMin > 0 ? 'late' : 'early'}`}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

function SegmentTip({ active, payload, rows, names }: { active?: boolean; payload?: { dataKey?: unknown; payload?: { row?: string } }[]; rows: TimelineRow[]; names: Record<string, string> }) {
  if (!active || !payload?.length) return null;
  const item = payload[0];
  const row = rows.find((r) => r.row === item.payload?.row);
  if (!/^s\d+$/.test(String(item.dataKey))) return null;
  const seg = row?.segments[Number(String(item.dataKey).slice(1))];
  if (!row || !seg) return null;
  return (
    <div className="rounded border border-ink-200 bg-white p-2 text-xs shadow">
      <p className="font-semibold">{row.row}: {seg.kind === 'dwell' ? `perched${seg.spanId && names[seg.spanId] ? ` on ${names[seg.spanId]}` : ''}` : 'flying'}</p>
      <p>{clockOffset(seg.startMin)} to {clockOffset(seg.endMin)} · {duration(seg.endMin - seg.startMin)}</p>
    </div>
  );
}
