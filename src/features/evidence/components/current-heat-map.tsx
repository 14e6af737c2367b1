import type { LoadEvidenceView } from '#shared/schemas/load-evidence.ts';
import { heatCells, monthLabel, rampColour } from '../charts-data.ts';

/** Median line current by month (rows) and hour of day (columns), drawn as coloured cells with a legend. */
export function CurrentHeatMap({ months }: { months: LoadEvidenceView['months'] }) {
  const { cells, minA, maxA } = heatCells(months);
  const cell = 26;
  const left = 76;
  const top = 18;
  const width = left + 24 * cell + 8;
  const height = top + months.length * cell + 8;
  return (
    <figure aria-label="Median current by month and hour of day">
      <svg viewBox={`0 0 ${width} ${height}`} className="w-full" role="img">
        {Array.from({ length: 24 }, (_, h) => h % 3 === 0 && (
          <text key={h} x={left + h * cell + cell / 2} y={12} fontSize={10} textAnchor="middle" fill="#1d4f57">{String(h).padStart(2, '0')}</text>
        ))}
        {months.map((m, row) => (
          <text key={m.month} x={left - 6} y={top + row * cell + cell / 2 + 4} fontSize={11} textAnchor="end" fill="#12343b">{monthLabel(m.month)}</text>
        ))}
        {cells.map((c) => {
          const row = months.findIndex((m) => m.month === c.month);
          return (
            <rect key={`${c.month}-${c.hour}`} x={left + c.hour * cell} y={top + row * cell} width={cell - 2} height={cell - 2} rx={3} fill={c.colour} stroke={c.currentA === null ? '#b6d0d3' : 'none'} strokeDasharray={c.currentA === null ? '2 2' : undefined}>
              <title>{`${monthLabel(c.month)}, ${String(c.hour).padStart(2, '0')}:00 — ${c.currentA === null ? 'no readings' : `${Math.round(c.currentA)} A median`}`}</title>
            </rect>
          );
        })}
      </svg>
      <figcaption className="mt-2 flex items-center gap-2 text-xs text-ink-700">
        <span>{Math.round(minA)} A</span>
        <span className="h-3 w-40 rounded" style={{ background: `linear-gradient(to right, ${[0, 0.25, 0.5, 0.75, 1].map(rampColour).join(', ')})` }} aria-hidden />
        <span>{Math.round(maxA)} A</span>
        <span className="ml-2">Hour of day as written in the readings; a dashed cell has no readings.</span>
      </figcaption>
    </figure>
  );
}
