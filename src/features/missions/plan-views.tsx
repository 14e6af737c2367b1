// What a plan shows: the summary, the charge chart, the legs table and the perch table, in the user's units.
import { Link } from 'react-router';
import { CartesianGrid, Line, LineChart, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import { approachDistanceM } from '#shared/engineering/clearance.ts';
import type { Line as PowerLine } from '#shared/schemas/inventory.ts';
import { loadSourceLabel } from '#shared/schemas/assessment.ts';
import { formatQuantity, type UnitSystem } from '#shared/units.ts';
import { chargeSeries, formatCourse, formatDistance, formatDuration, formatPercent, wallClock, type ChargePoint } from './transforms.ts';
import type { FeasiblePlan, PlanPerch } from './types.ts';

const minutesLabel = (m: number) => `${Math.floor(m / 60)}:${String(Math.round(m % 60)).padStart(2, '0')}`;

export function PlanSummary({ plan, offset, system }: { plan: FeasiblePlan; offset: string; system: UnitSystem }) {
  const dwellS = plan.totalDwellS ?? plan.perches.reduce((s, p) => s + p.dwellS, 0);
  const energyWh = plan.totalEnergyWh ?? plan.legs.reduce((s, l) => s + l.energyWh, 0);
  const items: [string, string][] = [
    ['Distance', formatDistance(plan.totalDistanceM, system)],
    ['Duration', formatDuration(plan.totalDurationS)],
    ['Perches', String(plan.perches.length)],
    ['Charging', formatDuration(dwellS)],
    ['Flight energy', formatQuantity(energyWh, 'energy', system)],
  ];
  if (plan.departAt) items.push(['Departs', wallClock(plan.departAt, offset, true)]);
  if (plan.arriveAt) items.push(['Finishes', wallClock(plan.arriveAt, offset, true)]);
  return (
    <dl className="grid grid-cols-2 gap-3 sm:grid-cols-4" data-testid="plan-summary">
      {items.map(([k, v]) => (
        <div key={k} className="rounded-lg bg-ink-50 p-2">
          <dt className="text-xs text-ink-700">{k}</dt>
          <dd className="text-lg font-bold">{v}</dd>
        </div>
      ))}
    </dl>
  );
}

/** Battery charge over the whole mission: falls along each leg, climbs while the drone dwells on a perch. */
export function ChargeChart({ plan, reservePercent, height = 260, animate = false }: { plan: FeasiblePlan; reservePercent?: number; height?: number; animate?: boolean }) {
  const data: ChargePoint[] = chargeSeries(plan);
  const maxT = data.length ? data[data.length - 1].tMin : 0;
  return (
    <figure className="w-full" data-testid="charge-chart" aria-label="Battery charge over the mission">
      <div style={{ height }} role="img" aria-label={`Battery charge from ${formatPercent(data[0]?.socPct)} at departure to ${formatPercent(data[data.length - 1]?.socPct)} at the end`}>
        <ResponsiveContainer width="100%" height="100%">
          <LineChart data={data} margin={{ left: 4, right: 16, top: 8, bottom: 8 }}>
            <CartesianGrid stroke="#dce9ea" />
            <XAxis dataKey="tMin" type="number" domain={[0, Math.max(1, Math.ceil(maxT))]} tickFormatter={minutesLabel} label={{ value: 'h:mm since departure', position: 'insideBottomRight', offset: -4, fontSize: 11 }} />
            <YAxis domain={[0, 100]} unit=" %" width={52} />
            {reservePercent !== undefined && (
              <ReferenceLine y={reservePercent} stroke="#b3261e" strokeDasharray="4 3" label={{ value: `reserve ${reservePercent} %`, position: 'insideTopRight', fontSize: 11, fill: '#b3261e' }} />
            )}
            <Tooltip
              labelFormatter={(v) => `${minutesLabel(Number(v))} since departure`}
              formatter={(v, _n, item) => [`${Number(v).toFixed(0)} %`, (item.payload as ChargePoint).label]}
            />
            <Line type="linear" dataKey="socPct" name="Charge" stroke="#1d4f57" strokeWidth={2.5} dot={{ r: 3 }} isAnimationActive={animate} />
          </LineChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="text-xs text-ink-700">Charge falls along each leg and climbs while the drone perches.</figcaption>
    </figure>
  );
}

function legEndName(plan: FeasiblePlan, i: number) {
  const leg = plan.legs[i];
  if (leg.toSpanId != null) {
    const n = plan.legs.slice(0, i + 1).filter((l) => l.toSpanId != null).length;
    return `Perch ${n}`;
  }
  if (leg.to?.kind === 'base') return 'Base';
  const targetAlready = plan.legs.slice(0, i).some((l) => l.toSpanId == null);
  return targetAlready ? 'Base' : 'Target';
}

function legStartName(plan: FeasiblePlan, i: number) {
  return i === 0 ? 'Base' : legEndName(plan, i - 1);
}

export function LegsTable({ plan, system }: { plan: FeasiblePlan; system: UnitSystem }) {
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-sm" data-testid="legs-table">
        <caption className="mb-1 text-left text-lg font-bold">Legs</caption>
        <thead>
          <tr className="text-left text-ink-700">
            <th className="py-1">Leg</th>
            <th className="text-right">Distance</th>
            <th className="text-right">Course</th>
            <th className="text-right">Ground speed</th>
            <th className="text-right">Time</th>
            <th className="text-right">Energy</th>
            <th className="text-right">Charge start → end</th>
          </tr>
        </thead>
        <tbody>
          {plan.legs.map((l, i) => (
            <tr key={i} className="border-t border-ink-100 align-top">
              <td className="py-1.5">
                <span className="font-semibold">{legStartName(plan, i)} → {legEndName(plan, i)}</span>
                {l.cautionZones && l.cautionZones.length > 0 && (
                  <span className="block text-xs font-semibold text-brass-700">Crosses caution zone {l.cautionZones.map((z) => z.name).join(', ')}</span>
                )}
              </td>
              <td className="text-right">{formatDistance(l.distanceM, system)}</td>
              <td className="text-right">{formatCourse(l.courseDeg)}</td>
              <td className="text-right">{formatQuantity(l.groundSpeedMps, 'speed', system)}</td>
              <td className="text-right">{formatDuration(l.durationS)}</td>
              <td className="text-right">{formatQuantity(l.energyWh, 'energy', system, { digits: 1 })}</td>
              <td className="text-right">{formatPercent(l.socStartPct)} → {formatPercent(l.socEndPct)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

/** The approach distance for the perch's line voltage: the server's figure, else OSHA 29 CFR 1910.333(c)(3) from the line's kV. */
export function perchApproachM(p: PlanPerch, line: PowerLine | undefined): number | null {
  if (typeof p.approachDistanceM === 'number') return p.approachDistanceM;
  const kv = p.voltageKv ?? line?.voltageKv;
  return typeof kv === 'number' ? approachDistanceM(kv) : null;
}

/** "measured, June 2026" when the line's metered month fed the harvest, else "typed estimate". */
export function perchLoadSource(p: Pick<PlanPerch, 'harvestSource' | 'loadMonth'>): string {
  return p.harvestSource === 'series' && p.loadMonth ? loadSourceLabel({ kind: 'measured', month: p.loadMonth }) : 'typed estimate';
}

export function perchName(p: PlanPerch, i: number) {
  const span = p.spanLabel ?? (p.fromStructureLabel && p.toStructureLabel ? `${p.fromStructureLabel} → ${p.toStructureLabel}` : null);
  return { title: `Perch ${i + 1}`, span };
}

export function PerchTable({ plan, lines, offset, system, links = true }: { plan: FeasiblePlan; lines: PowerLine[]; offset: string; system: UnitSystem; links?: boolean }) {
  if (plan.perches.length === 0) return <p className="text-sm text-ink-700">The target is within one charge: no perch needed.</p>;
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-sm" data-testid="perch-table">
        <caption className="mb-1 text-left text-lg font-bold">Perches</caption>
        <thead>
          <tr className="text-left text-ink-700">
            <th className="py-1">Perch</th>
            <th className="text-right">Arrival</th>
            <th className="text-right">Dwell</th>
            <th className="text-right">Harvest at that hour</th>
            <th className="text-right">Charge before → after</th>
            <th className="text-right">Line bearing</th>
            <th className="text-right">Conductor height</th>
            <th>Approach</th>
          </tr>
        </thead>
        <tbody>
          {plan.perches.map((p, i) => {
            const line = lines.find((l) => l.id === p.lineId);
            const name = perchName(p, i);
            const approach = perchApproachM(p, line);
            const kv = p.voltageKv ?? line?.voltageKv;
            return (
              <tr key={`${p.spanId}-${i}`} className="border-t border-ink-100 align-top">
                <td className="py-1.5">
                  <span className="font-semibold">{name.title}</span>
                  <span className="block text-xs">
                    {links ? <Link className="underline" to={`/spans/${p.spanId}`}>{name.span ?? 'Span'}</Link> : name.span}
                    {' · '}
                    {links ? <Link className="underline" to={`/lines/${p.lineId}`}>{p.lineName ?? line?.name ?? 'Line'}</Link> : (p.lineName ?? line?.name)}
                  </span>
                  {p.alongM !== undefined && (
                    <span className="block text-xs text-ink-700" data-testid="perch-point">
                      {p.perchPoint === 'planner' ? 'Moved by the planner: ' : 'Mid-span: '}
                      {formatQuantity(p.alongM, 'length', system, { digits: 1 })} from {p.fromStructureLabel ?? 'the from-structure'}
                    </span>
                  )}
                </td>
                <td className="text-right">{wallClock(p.arriveAt, offset)}</td>
                <td className="text-right">{formatDuration(p.dwellS)}</td>
                <td className="text-right">
                  {formatQuantity(p.harvestW, 'power', system)}
                  {p.harvestSource && <span className="block text-xs text-ink-700" data-testid="perch-load-source">load: {perchLoadSource(p)}</span>}
                </td>
                <td className="text-right">{formatPercent(p.socArrivePct)} → {formatPercent(p.socDepartPct)}</td>
                <td className="text-right">{formatCourse(p.lineBearingDeg)}</td>
                <td className="text-right">{formatQuantity(p.conductorHeightM, 'length', system, { digits: 1 })}</td>
                <td className="text-xs">
                  {approach !== null ? (
                    <span className="font-semibold text-alarm">Keep {formatQuantity(approach, 'length', system, { digits: 1 })} from the conductor{kv !== undefined ? ` (${formatQuantity(kv, 'voltage', system)})` : ''}</span>
                  ) : (
                    '—'
                  )}
                  <span className="block text-ink-700">OSHA 1910.333 minimum for people and conductive objects; local codes govern.</span>
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}
