// What the map's colours and widths mean, in the product's words.
import { SPAN_STATUSES, SPAN_STATUS_LOOK } from '../spans/status.ts';
import { FAILS_GATE_COLOUR, HARVEST_WIDTH_STOPS, NO_SCORE_COLOUR, SCORE_STOPS, STATUS_COLOURS, ZONE_COLOURS } from './map-styles.ts';

export function MapLegend({ colourBy }: { colourBy: 'status' | 'score' }) {
  const gradient = `linear-gradient(to right, ${SCORE_STOPS.map(([v, c]) => `${c} ${v}%`).join(', ')})`;
  return (
    <section className="card space-y-3 p-3 text-sm" aria-label="Legend">
      <h2 className="font-bold">Legend</h2>
      {colourBy === 'status' ? (
        <ul className="space-y-1">
          {SPAN_STATUSES.map((s) => (
            <li key={s} className="flex items-center gap-2">
              <span aria-hidden="true" className="inline-block h-1.5 w-8 rounded-full" style={{ background: STATUS_COLOURS[s] }} />
              <span aria-hidden="true">{SPAN_STATUS_LOOK[s].glyph}</span>
              {SPAN_STATUS_LOOK[s].label}
            </li>
          ))}
          <li className="flex items-center gap-2">
            <span aria-hidden="true" className="inline-block h-0.5 w-8 rounded-full" style={{ background: FAILS_GATE_COLOUR }} />
            <span aria-hidden="true">!</span>
            Approved, but now fails a gate (needs a decision; not offered for perching)
          </li>
        </ul>
      ) : (
        <div>
          <p>Perch score, 0 to 100</p>
          <div aria-hidden="true" className="mt-1 h-3 rounded-full" style={{ background: gradient }} />
          <div className="flex justify-between text-xs text-ink-700">
            <span>0 poor</span>
            <span>100 best</span>
          </div>
          <p className="mt-1 flex items-center gap-2 text-xs">
            <span aria-hidden="true" className="inline-block h-1.5 w-8 rounded-full" style={{ background: NO_SCORE_COLOUR }} />
            Not assessed yet
          </p>
        </div>
      )}
      <div>
        <p>Line width: power to harvest</p>
        <ul className="mt-1 flex items-end gap-3 text-xs">
          {HARVEST_WIDTH_STOPS.map(([w, px]) => (
            <li key={w} className="flex flex-col items-center gap-1">
              <span aria-hidden="true" className="inline-block w-8 rounded-full bg-ink-700" style={{ height: px }} />
              {w} W
            </li>
          ))}
        </ul>
      </div>
      <ul className="space-y-1">
        <li className="flex items-center gap-2">
          <span aria-hidden="true" className="inline-block h-4 w-6 rounded border-2 border-dashed" style={{ borderColor: ZONE_COLOURS.exclude, background: `${ZONE_COLOURS.exclude}38` }} />
          Exclude zone: no perching, approval refused
        </li>
        <li className="flex items-center gap-2">
          <span aria-hidden="true" className="inline-block h-4 w-6 rounded border-2 border-dashed" style={{ borderColor: '#9c6b17', background: `${ZONE_COLOURS.caution}38` }} />
          Caution zone: perch with care
        </li>
        <li className="flex items-center gap-2">
          <span aria-hidden="true" className="inline-block h-3 w-3 rounded-full border-2 border-ink-900 bg-white" />
          Structure (from zoom 13)
        </li>
        <li className="flex items-center gap-2">
          <span aria-hidden="true" className="inline-flex h-4 w-4 items-center justify-center rounded-full bg-ink-900 text-[9px] text-chalk">◉</span>
          Geotagged photo
        </li>
      </ul>
    </section>
  );
}
