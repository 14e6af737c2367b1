// Pure transforms from the line evidence answer to what the charts draw (unit-tested without a browser).
import type { HarvestHour, LoadEvidenceView } from '#shared/schemas/load-evidence.ts';
import { quantileSorted } from '#shared/engineering/percentiles.ts';
import { MONTHS } from './format.ts';

/** Colour of a heat-map cell: chalk (lowest) through brass to night teal (highest), the product's own ramp. */
const RAMP: [number, number, number][] = [
  [247, 244, 238], // chalk
  [240, 205, 133], // brass-300
  [201, 143, 40], // brass-600
  [63, 123, 131], // ink-500
  [18, 52, 59], // ink-900
];

export function rampColour(t: number): string {
  const x = Math.min(1, Math.max(0, Number.isFinite(t) ? t : 0)) * (RAMP.length - 1);
  const i = Math.min(RAMP.length - 2, Math.floor(x));
  const f = x - i;
  const c = RAMP[i].map((v, k) => Math.round(v + (RAMP[i + 1][k] - v) * f));
  return `rgb(${c[0]}, ${c[1]}, ${c[2]})`;
}

export interface HeatCell {
  month: string;
  hour: number;
  currentA: number | null;
  colour: string;
}

/** Month × hour cells with colours scaled between the lowest and highest median of the whole series. */
export function heatCells(months: LoadEvidenceView['months']): { cells: HeatCell[]; minA: number; maxA: number } {
  const values = months.flatMap((m) => m.hoursP50A.filter((v): v is number => v !== null));
  const minA = values.length ? Math.min(...values) : 0;
  const maxA = values.length ? Math.max(...values) : 0;
  const span = maxA - minA || 1;
  const cells = months.flatMap((m) =>
    m.hoursP50A.map((a, hour) => ({ month: m.month, hour, currentA: a, colour: a === null ? 'transparent' : rampColour((a - minA) / span) })),
  );
  return { cells, minA, maxA };
}

/** Rows for the harvest band chart: the P10–P90 range as a pair (recharts draws a range area from it) and the median. */
export function harvestBand(hours: HarvestHour[]) {
  return hours.map((h) => ({ hour: `${String(h.hour).padStart(2, '0')}:00`, band: [round1(h.p10W), round1(h.p90W)] as [number, number], p50W: round1(h.p50W) }));
}

const round1 = (v: number) => Math.round(v * 10) / 10;

/** "2026-03" → "Mar 2026". */
export function monthLabel(month: string): string {
  const [y, m] = month.split('-').map(Number);
  return `${MONTHS[m - 1]} ${y}`;
}

/** Residuals per line: the median of measured ÷ predicted over its perches, and how many perches. */
export function residualsByLine(items: { lineName?: string | null; ratio: number | null }[]) {
  const by = new Map<string, number[]>();
  for (const i of items) if (i.ratio !== null && i.lineName) by.set(i.lineName, [...(by.get(i.lineName) ?? []), i.ratio]);
  return [...by.entries()].map(([line, ratios]) => {
    const s = [...ratios].sort((a, b) => a - b);
    const mid = quantileSorted(s, 0.5);
    return { line, medianPct: Math.round((mid - 1) * 1000) / 10, perches: s.length };
  });
}
