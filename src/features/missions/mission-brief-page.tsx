// The printable mission brief (/missions/:id/brief): route drawing, legs, perches with approach data and line
// permissions, cautions and sign-off lines. Print stylesheet for A4 and Letter in brief.css.
import './brief.css';
import { useState } from 'react';
import { Link, useParams } from 'react-router';
import { useQueries, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api.ts';
import { date } from '../../lib/format.ts';
import { Caution } from '../../components/caution.tsx';
import { useMe } from '../auth/queries.ts';
import { MISSION_COLOURS } from './map-styles.ts';
import { missionRequest } from './plan-page-request.ts';
import { ChargeChart, LegsTable, PerchTable, PlanSummary } from './plan-views.tsx';
import { missionQueries } from './queries.ts';
import { formatDistance, formatWindFrom, infeasibleText, offsetOf, routeStops, staleReasonText, svgRoute, wallClock } from './transforms.ts';
import { formatQuantity } from '#shared/units.ts';
import { permissionCovers } from '#shared/schemas/line-permissions.ts';
import type { LinePermission } from './types.ts';

function RouteDrawing({ svg }: { svg: NonNullable<ReturnType<typeof svgRoute>> }) {
  return (
    <svg viewBox={`0 0 ${svg.width} ${svg.height}`} className="brief-map w-full rounded border border-ink-200 bg-white" role="img" aria-label="Route drawing" data-testid="brief-route">
      {svg.zones.map((z, i) => (
        <path key={i} d={z.d} fill={z.severity === 'exclude' ? MISSION_COLOURS.exclude : MISSION_COLOURS.caution} fillOpacity={0.2} stroke={z.severity === 'exclude' ? MISSION_COLOURS.exclude : '#9c6b17'} strokeDasharray="6 3">
          <title>{z.name}</title>
        </path>
      ))}
      <path d={svg.route} fill="none" stroke={MISSION_COLOURS.route} strokeWidth={3} strokeLinejoin="round" />
      {svg.stops.map((s, i) => (
        <g key={i}>
          <circle cx={s.x} cy={s.y} r={s.kind === 'perch' ? 9 : 11} fill={s.kind === 'perch' ? MISSION_COLOURS.perch : s.kind === 'base' ? MISSION_COLOURS.route : '#e8b04a'} stroke="#fff" strokeWidth={2} />
          <text x={s.x} y={s.y + 4} textAnchor="middle" fontSize={11} fontWeight={700} fill={s.kind === 'target' ? '#12343b' : '#fff'}>
            {s.kind === 'perch' ? (s.perchIndex ?? 0) + 1 : s.kind === 'base' ? 'B' : 'T'}
          </text>
        </g>
      ))}
      <g transform={`translate(16 ${svg.height - 16})`}>
        <line x1={0} x2={svg.scale.px} y1={0} y2={0} stroke="#12343b" strokeWidth={3} />
        <text x={0} y={-6} fontSize={11} fill="#12343b">{svg.scale.m >= 1000 ? `${svg.scale.m / 1000} km` : `${svg.scale.m} m`}</text>
      </g>
      <text x={svg.width - 16} y={24} textAnchor="end" fontSize={13} fontWeight={700} fill="#12343b">N ↑</text>
    </svg>
  );
}

export function MissionBriefPage() {
  const { id = '' } = useParams();
  const me = useMe();
  const system = me.unitSystem;
  const [paper, setPaper] = useState<'a4' | 'letter'>(system === 'us' ? 'letter' : 'a4');
  const mission = useQuery(missionQueries.detail(id));
  const zones = useQuery(missionQueries.zones());
  const lines = useQuery(missionQueries.lines());
  const drones = useQuery(missionQueries.drones());
  const harvesters = useQuery(missionQueries.harvesters());
  const plan = mission.data?.plan;
  const lineIds = plan?.feasible ? [...new Set(plan.perches.map((p) => p.lineId))] : [];
  const permissions = useQueries({
    queries: lineIds.map((lineId) => ({
      queryKey: ['lines', lineId, 'permissions'],
      queryFn: async () => (await api.get<{ items: LinePermission[] }>(`/api/lines/${encodeURIComponent(lineId)}/permissions`)).items,
    })),
  });
  if (mission.isPending) return <p className="p-8 text-center text-ink-700">Loading the brief…</p>;
  if (mission.error) throw mission.error;
  const m = mission.data;
  const r = missionRequest(m);
  const offset = (r.departAt && offsetOf(r.departAt)) || '+00:00';
  // The departure's own calendar day, as written with its offset: the day the owner's permission must cover.
  const departDay = r.departAt && /^\d{4}-\d{2}-\d{2}/.test(r.departAt) ? r.departAt.slice(0, 10) : null;
  const drone = drones.data?.find((d) => d.id === r.droneProfileId);
  const harvester = harvesters.data?.find((h) => h.id === r.harvesterProfileId);
  const stops = plan?.feasible && r.base && r.target ? routeStops(plan, r.base, r.target, r.returnToBase) : [];
  const activeZones = (zones.data?.features ?? []).filter((z) => z.properties.active);
  const svg = stops.length >= 2 ? svgRoute(stops, activeZones, 720, 420) : null;

  return (
    <article className="brief mx-auto max-w-4xl space-y-4 bg-white p-4" data-paper={paper} aria-labelledby="brief-title">
      <div className="brief-no-print flex flex-wrap items-center gap-2">
        <Link to={`/missions/${m.id}`} className="text-sm font-semibold text-ink-700 underline">← Mission</Link>
        <label className="ml-auto flex items-center gap-2 text-sm">
          Paper
          <select className="field-input w-32" value={paper} onChange={(e) => setPaper(e.target.value as 'a4' | 'letter')}>
            <option value="a4">A4</option>
            <option value="letter">Letter</option>
          </select>
        </label>
        <button type="button" className="btn-primary" onClick={() => window.print()}>Print</button>
      </div>
      <header>
        <p className="text-sm font-semibold text-ink-700">Roostline mission brief</p>
        <h1 id="brief-title" className="page-title">{m.name}</h1>
        <p className="text-sm">
          {r.departAt ? `Departs ${wallClock(r.departAt, offset, true)} (UTC${offset})` : ''}
          {drone ? ` · drone ${drone.name}` : ''}
          {harvester ? ` · harvester ${harvester.name}` : ''}
          {r.wind ? ` · wind ${formatQuantity(r.wind.speedMps, 'speed', system)} ${formatWindFrom(r.wind.fromDeg)}` : ''}
          {r.returnToBase ? ' · returns to base' : ''}
        </p>
        {r.base && r.target && (
          <p className="text-sm">Base {r.base.lat.toFixed(5)}°, {r.base.lon.toFixed(5)}° · target {r.target.lat.toFixed(5)}°, {r.target.lon.toFixed(5)}°</p>
        )}
        {m.stale && (
          <div className="mt-2 rounded border-2 border-alarm p-2">
            <strong className="text-alarm">This plan no longer holds — do not fly it.</strong>
            <ul className="list-disc pl-5 text-sm">{m.staleReasons.map((x, i) => <li key={i}>{staleReasonText(x)}</li>)}</ul>
          </div>
        )}
      </header>
      <Caution mission />
      {plan && !plan.feasible && <section className="rounded border-2 border-alarm p-3">{infeasibleText(plan, system).map((t) => <p key={t}>{t}</p>)}</section>}
      {plan?.feasible && (
        <>
          <section><PlanSummary plan={plan} offset={offset} system={system} /></section>
          {svg && <section aria-label="Route">{<RouteDrawing svg={svg} />}<p className="text-xs text-ink-700">Total {formatDistance(plan.totalDistanceM, system)}. Shaded: active no-perch zones (red exclude, amber caution).</p></section>}
          <section><ChargeChart plan={plan} reservePercent={drone?.reservePercent} height={200} /></section>
          <section><LegsTable plan={plan} system={system} /></section>
          <section><PerchTable plan={plan} lines={lines.data ?? []} offset={offset} system={system} links={false} /></section>
          <section aria-labelledby="brief-permissions">
            <h2 id="brief-permissions" className="text-lg font-bold">Line owners' permissions</h2>
            {lineIds.map((lineId, i) => {
              const line = lines.data?.find((l) => l.id === lineId);
              const items = permissions[i]?.data ?? [];
              return (
                <div key={lineId} className="mt-1 text-sm">
                  <strong>{line?.name ?? 'Line'}</strong>{line?.owner ? ` (${line.owner})` : ''}:
                  {items.length === 0 ? <span className="font-semibold text-alarm"> no permission on record</span> : (
                    <ul className="list-disc pl-5">
                      {items.map((p) => (
                        <li key={p.id}>{p.reference}, valid {date(p.validFrom)} to {date(p.validTo)}{p.expired ? ' — expired' : ''}{departDay && permissionCovers(p, departDay) ? ' — covers the departure day' : ''}{p.conditions ? `; conditions: ${p.conditions}` : ''}</li>
                      ))}
                    </ul>
                  )}
                </div>
              );
            })}
          </section>
        </>
      )}
      <section className="grid grid-cols-2 gap-8 pt-6" aria-label="Sign-off">
        {['Planner', 'Safety officer'].map((who) => (
          <div key={who} className="space-y-6 text-sm">
            <p className="font-semibold">{who}</p>
            <p className="border-b border-ink-900 pb-1">Name</p>
            <p className="border-b border-ink-900 pb-1">Signature</p>
            <p className="border-b border-ink-900 pb-1">Date</p>
          </div>
        ))}
      </section>
      <Caution mission compact />
    </article>
  );
}

export const Component = MissionBriefPage;
