// Charts of the span assessment: factor contributions, power vs line current, power over the day.
import { Bar, BarChart, CartesianGrid, ComposedChart, Legend, Line, LineChart, ReferenceDot, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { FactorView, HarvestCurveView } from '#shared/schemas/assessment.ts';
import { FACTOR_LABELS } from './queries.ts';

const INK = '#1d4f57';
const BRASS = '#c98f28';
const ALARM = '#b3261e';
const GRID = '#dce9ea';
const SHORT = '#b6d0d3';

/** Each factor's points against the most it could give (its weight share of 100). */
export function FactorContributionChart({ factors }: { factors: FactorView[] }) {
  const total = factors.reduce((s, f) => s + f.weight, 0) || 1;
  const data = factors.map((f) => ({
    name: FACTOR_LABELS[f.id] ?? f.id,
    contribution: +f.contribution.toFixed(1),
    missed: +Math.max(0, (100 * f.weight) / total - f.contribution).toFixed(1),
  }));
  return (
    <div className="h-64 w-full" data-testid="factor-chart" role="img" aria-label="Contribution of each factor to the score">
      <ResponsiveContainer width="100%" height="100%">
        <BarChart data={data} layout="vertical" margin={{ left: 16, right: 16, top: 8, bottom: 8 }}>
          <CartesianGrid stroke={GRID} horizontal={false} />
          <XAxis type="number" domain={[0, 'dataMax']} unit=" pt" />
          <YAxis type="category" dataKey="name" width={170} tick={{ fontSize: 13 }} />
          <Tooltip formatter={(v, name) => [`${v} points`, name === 'contribution' ? 'contributes' : 'short of its weight']} />
          <Legend formatter={(v) => <span className="text-ink-800">{v === 'contribution' ? 'Points contributed' : 'Points short of the factor’s weight'}</span>} />
          <Bar dataKey="contribution" stackId="a" fill={INK} isAnimationActive={false} />
          <Bar dataKey="missed" stackId="a" fill={SHORT} isAnimationActive={false} />
        </BarChart>
      </ResponsiveContainer>
    </div>
  );
}

/** Converter output versus line current, with the saturation onset and the span's min/typical/peak load marked. */
export function PowerVsCurrentChart({ curve }: { curve: HarvestCurveView }) {
  const data = curve.points.map((p) => ({ currentA: Math.round(p.currentA), powerW: +p.powerW.toFixed(2) }));
  const loads = [
    { key: 'min', label: 'min', a: curve.loadCurrentA.min, w: curve.harvestW.min },
    { key: 'typical', label: 'typical', a: curve.loadCurrentA.typical, w: curve.harvestW.typical },
    { key: 'peak', label: 'peak', a: curve.loadCurrentA.peak, w: curve.harvestW.peak },
  ];
  return (
    <div className="h-72 w-full" data-testid="power-current-chart" role="img" aria-label="Harvested power against line current">
      <ResponsiveContainer width="100%" height="100%">
        <LineChart data={data} margin={{ left: 8, right: 24, top: 16, bottom: 24 }}>
          <CartesianGrid stroke={GRID} />
          <XAxis dataKey="currentA" type="number" domain={[0, 'dataMax']} unit=" A" label={{ value: 'line current', position: 'insideBottom', offset: -12 }} />
          <YAxis unit=" W" width={64} />
          <Tooltip formatter={(v) => [`${v} W`, 'harvest']} labelFormatter={(a) => `${a} A`} />
          <Line dataKey="powerW" stroke={INK} strokeWidth={2} dot={false} isAnimationActive={false} />
          <ReferenceLine x={Math.round(curve.saturationOnsetA)} stroke={ALARM} strokeDasharray="5 4" label={{ value: `saturation from ${Math.round(curve.saturationOnsetA)} A`, position: 'insideTopLeft', fill: ALARM, fontSize: 12 }} />
          {loads.map((l) => (
            <ReferenceDot key={l.key} x={l.a} y={l.w} r={5} fill={BRASS} stroke={INK} label={{ value: l.label, position: 'top', fontSize: 12 }} />
          ))}
        </LineChart>
      </ResponsiveContainer>
    </div>
  );
}

/** Harvest hour by hour from the line's 24-hour load profile (bars) with the load itself (line). */
export function DailyPowerChart({ daily }: { daily: NonNullable<HarvestCurveView['daily']> }) {
  const data = daily.map((d) => ({ hour: `${String(d.hour).padStart(2, '0')}:00`, powerW: +d.powerW.toFixed(2), currentA: Math.round(d.currentA) }));
  return (
    <div className="h-72 w-full" data-testid="daily-power-chart" role="img" aria-label="Harvested power over the day">
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart data={data} margin={{ left: 8, right: 8, top: 16, bottom: 8 }}>
          <CartesianGrid stroke={GRID} />
          <XAxis dataKey="hour" interval={2} />
          <YAxis yAxisId="w" unit=" W" width={64} />
          <YAxis yAxisId="a" orientation="right" unit=" A" width={64} />
          <Tooltip />
          <Legend formatter={(v) => (v === 'powerW' ? 'Harvest (W)' : 'Line load (A)')} />
          <Bar yAxisId="w" dataKey="powerW" fill={INK} isAnimationActive={false} />
          <Line yAxisId="a" dataKey="currentA" stroke={BRASS} strokeWidth={2} dot={false} isAnimationActive={false} />
        </ComposedChart>
      </ResponsiveContainer>
    </div>
  );
}
