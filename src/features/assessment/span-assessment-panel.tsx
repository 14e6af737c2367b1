// The span page's assessment: pick a harvester × drone pair, see the gates, each factor's contribution,
// harvest at minimum/typical/peak load, charge time and the two harvest charts.
import { useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { formatQuantity } from '#shared/units.ts';
import { loadSourceLabel } from '#shared/schemas/assessment.ts';
import { Caution } from '../../components/caution.tsx';
import { useMe } from '../auth/queries.ts';
import { codeWords, dateTime, duration, gateDetail, number, percent, score } from '../../lib/format.ts';
import { DailyPowerChart, FactorContributionChart, PowerVsCurrentChart } from './charts.tsx';
import { assessmentQueries, FACTOR_LABELS, GATE_LABELS } from './queries.ts';

function Figure({ label, value, caution = false, source }: { label: string; value: string; caution?: boolean; /** Which load the figure rests on. */ source?: string }) {
  return (
    <div>
      <dt className="text-sm text-ink-700">{label}</dt>
      <dd className="text-lg font-bold">
        {value}
        {caution && <span className="sr-only"> (see caution)</span>}
      </dd>
      {source && <dd className="text-xs text-ink-700" data-testid="harvest-load-source">load: {source}</dd>}
    </div>
  );
}

export function SpanAssessmentPanel({ spanId }: { spanId: string }) {
  const me = useMe();
  const system = me.unitSystem;
  const pairs = useQuery(assessmentQueries.ofSpan(spanId));
  const [pairKey, setPairKey] = useState<string | null>(null);
  const items = pairs.data ?? [];
  const a = items.find((p) => `${p.harvesterProfileId}|${p.droneProfileId}` === pairKey) ?? items[0];
  const curve = useQuery({ ...assessmentQueries.curve(spanId, a?.harvesterProfileId), enabled: !!a });

  if (pairs.isPending) return <p className="text-ink-700">Loading the assessment…</p>;
  if (pairs.error) return <p className="text-alarm">The assessment could not be loaded: {pairs.error.message}</p>;
  if (!a) return <p className="text-ink-700" data-testid="assessment-none">Not assessed yet: it appears once the span has a line, structures and an active harvester and drone profile.</p>;

  const failed = a.gates.filter((g) => !g.passed);
  // Older stored rows may predate the field: they rest on the typed estimate.
  const source = loadSourceLabel(a.loadSource ?? { kind: 'line-estimate', month: null });
  return (
    <div className="space-y-5" data-testid="span-assessment-panel">
      <div className="flex flex-wrap items-end gap-3">
        <label className="block">
          <span className="field-label">Harvester × drone</span>
          <select className="field-input" value={`${a.harvesterProfileId}|${a.droneProfileId}`} onChange={(e) => setPairKey(e.target.value)}>
            {items.map((p) => (
              <option key={`${p.harvesterProfileId}|${p.droneProfileId}`} value={`${p.harvesterProfileId}|${p.droneProfileId}`}>
                {p.harvesterName} × {p.droneName}
              </option>
            ))}
          </select>
        </label>
        <p className="text-sm text-ink-700">
          {codeWords(a.methodVersion.split('/')[0])} method {a.methodVersion.split('/')[1] ?? ''}, settings v{a.settingsVersion}, harvester v{a.harvesterVersion}, drone v{a.droneVersion}; computed {dateTime(a.computedAt)}
        </p>
      </div>

      <dl className="grid grid-cols-2 gap-3 sm:grid-cols-4">
        <div>
          <dt className="text-sm text-ink-700">Perchable</dt>
          <dd className={`text-lg font-bold ${a.perchable ? 'text-go' : 'text-alarm'}`} data-testid="assessment-perchable">
            {a.perchable ? 'Yes' : 'No'}
          </dd>
        </div>
        <Figure label="Score" value={`${score(a.score)} / 100`} />
        <Figure label="Harvest at typical load" value={formatQuantity(a.harvestW, 'power', system)} source={source} />
        <Figure label="Charge time (typical load)" value={a.chargeTimeMin === null ? 'never (no harvest)' : duration(a.chargeTimeMin)} source={source} />
        <Figure label="Harvest at minimum load" value={formatQuantity(a.harvestMinW, 'power', system)} source={source} />
        <Figure label="Harvest at peak load" value={formatQuantity(a.harvestPeakW, 'power', system)} source={source} />
        <Figure label="Conductor at peak load" value={formatQuantity(a.conductorTempC, 'temperature', system)} caution />
        <Figure label="Ampacity" value={formatQuantity(a.ampacityA, 'current', system)} caution />
        <Figure label="Code ground clearance" value={formatQuantity(a.codeClearanceM, 'length', system)} caution />
        <Figure label="Ground-crew approach distance" value={formatQuantity(a.approachDistanceM, 'length', system)} caution />
      </dl>
      <Caution />

      <section aria-labelledby="gates-title" className="space-y-2">
        <h3 id="gates-title" className="font-bold">
          Gates {failed.length ? <span className="text-alarm">— {failed.length} not met</span> : <span className="text-go">— all met</span>}
        </h3>
        <ul className="space-y-1" data-testid="assessment-gates">
          {a.gates.map((g) => (
            <li key={g.id} className="flex gap-2 rounded-lg border border-ink-100 p-2">
              <span aria-hidden className={`font-bold ${g.passed ? 'text-go' : g.blocking ? 'text-alarm' : 'text-brass-700'}`}>
                {g.passed ? '✓' : g.blocking ? '✗' : '!'}
              </span>
              <span>
                <strong>{GATE_LABELS[g.id] ?? g.id}</strong>
                <span className="sr-only">{g.passed ? ': met' : g.blocking ? ': not met' : ': flagged'}</span>
                {!g.blocking && !g.passed && <span className="ml-1 text-sm text-brass-700">(data-quality flag, does not block)</span>}
                <br />
                <span className="text-sm text-ink-700">{gateDetail(g, system)}</span>
              </span>
            </li>
          ))}
        </ul>
      </section>

      <section aria-labelledby="factors-title" className="space-y-2">
        <h3 id="factors-title" className="font-bold">Score breakdown</h3>
        <FactorContributionChart factors={a.factors} />
        <table className="w-full text-sm">
          <thead>
            <tr className="text-left text-ink-700">
              <th className="py-1">Factor</th>
              <th className="py-1 text-right">Value</th>
              <th className="py-1 text-right">Weight</th>
              <th className="py-1 text-right">Points</th>
            </tr>
          </thead>
          <tbody>
            {a.factors.map((f) => (
              <tr key={f.id} className="border-t border-ink-100">
                <td className="py-1">{FACTOR_LABELS[f.id] ?? f.id}</td>
                <td className="py-1 text-right">{percent(f.value)}</td>
                <td className="py-1 text-right">{f.weight}</td>
                <td className="py-1 text-right font-semibold">{number(f.contribution)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </section>

      <section aria-labelledby="curve-title" className="space-y-2">
        <h3 id="curve-title" className="font-bold">Power vs line current — {a.harvesterName}</h3>
        {curve.isPending && <p className="text-ink-700">Loading the curve…</p>}
        {curve.error && <p className="text-alarm">{curve.error.message}</p>}
        {curve.data && (
          <>
            <PowerVsCurrentChart curve={curve.data} />
            <p className="text-sm text-ink-700">
              Below {formatQuantity(curve.data.saturationOnsetA, 'current', system)} the core stays linear and power grows with the square of the current; above it the core saturates and power grows only in proportion.
            </p>
          </>
        )}
      </section>

      <section aria-labelledby="daily-title" className="space-y-2">
        <h3 id="daily-title" className="font-bold">Power over the day</h3>
        {curve.data?.daily && (
          <p className="text-sm text-ink-700" data-testid="daily-load-source">
            {curve.data.loadSource === 'series'
              ? `Load: ${loadSourceLabel({ kind: 'measured', month: curve.data.loadMonth ?? null })} (the line's metered currents, hourly medians).`
              : "Load: typed estimate (the line's 24-hour profile)."}
          </p>
        )}
        {curve.data && (curve.data.daily ? <DailyPowerChart daily={curve.data.daily} /> : <p className="text-ink-700">The line has no 24-hour load profile; add one on the line to see the daily harvest.</p>)}
      </section>
    </div>
  );
}
