import { useState } from 'react';
import { Link } from 'react-router';
import { useQuery } from '@tanstack/react-query';
import { Bar, BarChart, CartesianGrid, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import { formatQuantity } from '#shared/units.ts';
import { useMe } from '../auth/queries.ts';
import { spanQueries } from '../spans/queries.ts';
import { duration, score } from '../../lib/format.ts';
import { Caution } from '../../components/caution.tsx';

const TOP = 12;

/** The planner's landing: approved spans ranked by harvestable power for the default harvester × drone pair. */
export function PlanningHome() {
  const me = useMe();
  const [minHarvestW, setMinHarvestW] = useState(20);
  // Planners are offered only spans that pass every blocking gate: approved is not enough once a gate fails.
  const query = { status: 'approved' as const, perchable: true, minHarvestW, sort: '-harvestW', page: 1, pageSize: TOP };
  const { data, isPending, error } = useQuery(spanQueries.list(query));
  const link = `?status=approved&minHarvestW=${minHarvestW}&sort=-harvestW`;
  const rows = (data?.items ?? []).map((s) => ({
    id: s.id,
    name: `${s.fromStructureLabel} → ${s.toStructureLabel}`,
    line: s.lineName,
    harvestW: Math.round((s.assessment?.harvestW ?? 0) * 10) / 10,
    score: s.assessment?.score ?? null,
    chargeTimeMin: s.assessment?.chargeTimeMin ?? null,
  }));

  return (
    <div className="space-y-4">
      <div className="card flex flex-wrap items-end gap-4">
        <label className="block">
          <span className="field-label">Minimum harvest (W)</span>
          <input
            type="number"
            min={0}
            step={5}
            className="field-input w-40"
            value={minHarvestW}
            onChange={(e) => setMinHarvestW(Math.max(0, Number(e.target.value) || 0))}
          />
        </label>
        <Link className="btn-primary" to={`/spans${link}`}>All {data ? data.total : ''} matching spans</Link>
        <Link className="btn-ghost" to={`/map${link}`}>Show them on the map</Link>
        <Link className="btn-ghost" to="/calculators">Calculators</Link>
      </div>
      <section className="card" aria-labelledby="top-spans">
        <h2 id="top-spans" className="mb-2 text-lg font-bold">Best approved perch sites by harvestable power</h2>
        <p className="mb-2 text-sm text-ink-700">Only approved spans that pass every blocking gate (clearance, contact temperature, gripper fit, no-perch zones, useful harvest) are listed.</p>
        {isPending && <p>Loading…</p>}
        {error && <p role="alert" className="field-error">{error.message}</p>}
        {data && rows.length === 0 && <p>No approved span harvests at least {minHarvestW} W. Lower the minimum.</p>}
        {rows.length > 0 && (
          <div className="grid gap-4 lg:grid-cols-2">
            <div className="h-80" aria-label="Harvest power of the best spans">
              <ResponsiveContainer width="100%" height="100%">
                <BarChart data={rows} layout="vertical" margin={{ left: 8, right: 16, top: 4, bottom: 4 }}>
                  <CartesianGrid strokeDasharray="3 3" horizontal={false} />
                  <XAxis type="number" unit=" W" />
                  <YAxis type="category" dataKey="name" width={130} tick={{ fontSize: 11 }} />
                  <Tooltip formatter={(v) => [`${v} W`, 'Harvest']} />
                  <Bar dataKey="harvestW" fill="#c98f28" isAnimationActive={false} />
                </BarChart>
              </ResponsiveContainer>
            </div>
            <table className="w-full text-sm">
              <thead>
                <tr className="text-left text-ink-700">
                  <th className="py-1">Span</th>
                  <th>Line</th>
                  <th className="text-right">Harvest</th>
                  <th className="text-right">Score</th>
                  <th className="text-right">Recharge</th>
                </tr>
              </thead>
              <tbody>
                {rows.map((r) => (
                  <tr key={r.id} className="border-t border-ink-100">
                    <td className="py-2"><Link className="font-semibold underline" to={`/spans/${r.id}`}>{r.name}</Link></td>
                    <td>{r.line}</td>
                    <td className="text-right">{formatQuantity(r.harvestW, 'power', me.unitSystem)}</td>
                    <td className="text-right">{score(r.score)}</td>
                    <td className="text-right">{duration(r.chargeTimeMin)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </section>
      <Caution />
    </div>
  );
}
