import { Area, CartesianGrid, ComposedChart, Legend, Line, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { HarvestHour } from '#shared/schemas/load-evidence.ts';
import { harvestBand } from '../charts-data.ts';

/** Harvest over the day: the P10–P90 band of the measured currents' harvest, with the median as a line. */
export function HarvestBandChart({ hours, name }: { hours: HarvestHour[]; name: string }) {
  const data = harvestBand(hours);
  return (
    <div className="h-72" aria-label={`Harvest over the day for ${name}`}>
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart data={data} margin={{ left: 4, right: 16, top: 8, bottom: 4 }}>
          <CartesianGrid strokeDasharray="3 3" />
          <XAxis dataKey="hour" interval={2} tick={{ fontSize: 11 }} />
          <YAxis unit=" W" width={64} />
          <Tooltip formatter={(v, key) => (Array.isArray(v) ? [`${v[0]}–${v[1]} W`, 'P10–P90'] : [`${v} W`, key === 'p50W' ? 'Median' : String(key)])} />
          <Legend />
          <Area dataKey="band" name="P10–P90" stroke="none" fill="#f0cd85" fillOpacity={0.7} isAnimationActive={false} />
          <Line dataKey="p50W" name="Median (P50)" stroke="#1d4f57" strokeWidth={2} dot={false} isAnimationActive={false} />
        </ComposedChart>
      </ResponsiveContainer>
    </div>
  );
}
