import { useState } from 'react';
import { Link, useParams } from 'react-router';
import { useQuery, useQueryClient } from '@tanstack/react-query';
import { evidenceApi } from '../api.ts';
import { formatQuantity } from '#shared/units.ts';
import { useMe } from '../../auth/queries.ts';
import { evidenceQueries } from '../queries.ts';
import { count, writtenTime } from '../format.ts';
import { monthLabel } from '../charts-data.ts';
import { CurrentHeatMap } from './current-heat-map.tsx';
import { HarvestBandChart } from './harvest-band-chart.tsx';
import { PeakChart } from './peak-chart.tsx';
import { SeriesImportCard } from './series-import-card.tsx';
import { Caution } from '../../../components/caution.tsx';

/** A line's load evidence: its metered series, the month × hour picture, peaks against ampacity and harvest over the day. */
export function LineEvidencePage() {
  const { id = '' } = useParams();
  const me = useMe();
  const [month, setMonth] = useState<string | undefined>(undefined);
  const lines = useQuery(evidenceQueries.lines());
  const q = useQuery(evidenceQueries.line(id, month));
  const [harvesterId, setHarvesterId] = useState<string | null>(null);
  const line = lines.data?.find((l) => l.id === id);
  const canImport = me.roles.some((r) => r === 'admin' || r === 'safety');
  const ev = q.data;
  const qc = useQueryClient();
  const [applied, setApplied] = useState<string | null>(null);
  const apply = async (source: 'series' | 'flights') => {
    if (!line) return;
    if (!window.confirm(source === 'series' ? "Replace this line's load estimate with the metered series (P10, median, highest reading, hourly medians)? Its spans will be rescored." : "Scale this line's load estimate by what the flight records measured? Its spans will be rescored.")) return;
    setApplied(null);
    try {
      const updated = await evidenceApi.applyEstimate(line.id, source, line.version);
      setApplied(`Load estimate replaced: ${formatQuantity(updated.loadTypicalA, 'current', me.unitSystem)} typical. The line's spans are being rescored.`);
      await qc.invalidateQueries({ queryKey: ['evidence'] });
    } catch (e) {
      setApplied((e as Error).message);
    }
  };
  const h = ev?.harvest.find((x) => x.harvesterId === harvesterId) ?? ev?.harvest[0];
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-baseline gap-3">
        <Link to="/evidence" className="underline">Load evidence</Link>
        <h1 className="text-2xl font-bold">{line ? line.name : 'Line'}</h1>
      </div>
      {q.error && <p role="alert" className="field-error">{q.error.message}</p>}
      {ev && (
        <section className="card space-y-1" aria-labelledby="series-summary">
          <h2 id="series-summary" className="text-lg font-bold">Metered series</h2>
          {ev.series ? (
            <p>
              {count(ev.series.readingCount)} readings over {count(ev.series.dayCount)} days, {writtenTime(ev.series.firstAt)} to {writtenTime(ev.series.lastAt)}.
            </p>
          ) : (
            <p>No metered series yet: harvest figures for this line use the surveyed load estimate.</p>
          )}
        </section>
      )}
      {canImport && <SeriesImportCard lineId={id} />}
      {me.roles.includes('admin') && ev && (
        <section className="card flex flex-wrap items-center gap-3" aria-label="Load estimate from evidence">
          <span className="font-semibold">Load estimate from evidence</span>
          <button type="button" className="btn-ghost" disabled={!ev.series} onClick={() => apply('series')}>Use the metered series</button>
          <button type="button" className="btn-ghost" onClick={() => apply('flights')}>Scale by flight records</button>
          {applied && <p role="status" className="w-full text-sm">{applied}</p>}
        </section>
      )}
      {ev && ev.months.length > 0 && (
        <>
          <section className="card" aria-labelledby="heat">
            <h2 id="heat" className="mb-2 text-lg font-bold">Median current by month and hour</h2>
            <CurrentHeatMap months={ev.months} />
          </section>
          <section className="card" aria-labelledby="peaks">
            <h2 id="peaks" className="mb-2 text-lg font-bold">Monthly peak against ampacity</h2>
            <PeakChart months={ev.months} ampacityA={ev.ampacityA} />
            <p className="text-sm text-ink-700">
              Ampacity is the lowest of this line's spans at the design weather (IEEE Std 738-2012 heat balance); a peak above it means the conductor ran hotter than that weather allows.
            </p>
          </section>
        </>
      )}
      {ev && (
        <section className="card space-y-3" aria-labelledby="harvest-day">
          <div className="flex flex-wrap items-end gap-3">
            <h2 id="harvest-day" className="text-lg font-bold">Harvest over the day</h2>
            <label className="block">
              <span className="field-label">Month</span>
              <select className="field-input" value={ev.month} onChange={(e) => setMonth(e.target.value)}>
                {[...new Set([...ev.months.map((m) => m.month), ev.month])].sort().map((m) => <option key={m} value={m}>{monthLabel(m)}</option>)}
              </select>
            </label>
            {ev.harvest.length > 1 && (
              <label className="block">
                <span className="field-label">Harvester</span>
                <select className="field-input" value={h?.harvesterId} onChange={(e) => setHarvesterId(e.target.value)}>
                  {ev.harvest.map((x) => <option key={x.harvesterId} value={x.harvesterId}>{x.harvesterName}</option>)}
                </select>
              </label>
            )}
          </div>
          <p className="text-sm">
            From {ev.profile.source === 'series' ? 'the metered series' : "the line's load estimate (no readings in this month)"}.
            {h && <> Median energy per day: <strong>{formatQuantity(h.energyPerDayP50Wh, 'energy', me.unitSystem)}</strong>.</>}
          </p>
          {h && <HarvestBandChart hours={h.hours} name={h.harvesterName} />}
          <Caution compact />
        </section>
      )}
    </div>
  );
}
