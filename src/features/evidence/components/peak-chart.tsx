import { Bar, BarChart, CartesianGrid, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { LoadEvidenceView } from '#shared/schemas/load-evidence.ts';
import { monthLabel } from '../charts-data.ts';

/** Each month's highest reading against the lowest ampacity of the line's spans (IEEE 738 at the design weather). */
export function PeakChart({ months, ampacityA }: { months: LoadEvidenceView['months']; ampacityA: number | null }) {
  const data = months.map((m) => ({ month: monthLabel(m.month), peakA: Math.round(m.peakA), over: ampacityA !== null && m.peakA > ampacityA }));
  const top = Math.max(ampacityA ?? 0, ...data.map((d) => d.peakA)) * 1.1;
  return (
    <div className="h-64" aria-label="Monthly peak current against ampacity">
      <ResponsiveContainer width="100%" height="100%">
        <BarChart data={data} margin={{ left: 4, right: 16, top: 16, bottom: 4 }}>
          <CartesianGrid strokeDasharray="3 3" vertical={false} />
          <XAxis dataKey="month" tick={{ fontSize: 11 }} />
          <YAxis unit=" A" width={64} domain={[0, Math.ceil(top)]} />
          <Tooltip formatter={(v) => [`${v} A`, 'Peak']} />
          <Bar dataKey="peakA" fill="#3f7b83" isAnimationActive={false} />
          {ampacityA !== null && <ReferenceLine y={Math.round(ampacityA)} stroke="#b3261e" strokeDasharray="6 3" label={{ value: `Ampacity ${Math.round(ampacityA)} A`, position: 'insideTopRight', fontSize: 11, fill: '#b3261e' }} />}
        </BarChart>
      </ResponsiveContainer>
    </div>
  );
}
