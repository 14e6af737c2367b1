// Calculators for every role: live preview with the shared methods, confirmed by the server (the authority).
import { useMemo, useState } from 'react';
import { useMutation } from '@tanstack/react-query';
import { CartesianGrid, Line, LineChart, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import {
  benchTestCalcSchema,
  conductorThermalCalcSchema,
  harvestCalcSchema,
  type BenchTestCalcResult,
  type ConductorThermalCalcResult,
  type HarvestCalcResult,
} from '#shared/schemas/calc.ts';
import { harvest, harvestCurve } from '#shared/engineering/ct-harvester.ts';
import { conductorThermal } from '#shared/engineering/ieee738.ts';
import { benchTest } from '#shared/engineering/bench-test.ts';
import { ACSR_CONDUCTORS, thermalConductorOf } from '#shared/engineering/conductors.ts';
import { DEMO_HARVESTERS } from '#shared/engineering/demo-profiles.ts';
import { formatQuantity, type UnitSystem } from '#shared/units.ts';
import { Caution } from '../../components/caution.tsx';
import { api, ApiError } from '../../lib/api.ts';
import { useMe } from '../auth/queries.ts';
import { issuesByField, NumberFields, toSi, useFieldValues, type FieldSpec } from './number-fields.tsx';

const fmt = (x: number | undefined, digits = 2) => (x === undefined || !Number.isFinite(x) ? '—' : x.toLocaleString('en-US', { maximumFractionDigits: digits, minimumFractionDigits: digits }));

function ServerCheck<T>({ result, error, pending, render }: { result: T | undefined; error: unknown; pending: boolean; render: (r: T) => string }) {
  if (pending) return <p className="text-sm text-ink-700">Asking the server…</p>;
  if (error instanceof ApiError) return <p className="field-error">Server: {error.message}</p>;
  if (error) return <p className="field-error">The server could not be reached.</p>;
  if (result) return <p className="text-sm text-ink-800" data-testid="server-result">Server confirms: {render(result)}</p>;
  return null;
}

// ——— harvester ———
const HARVEST_FIELDS: FieldSpec[] = [
  { key: 'currentA', label: 'Line current', kind: 'current' },
  { key: 'frequencyHz', label: 'Frequency', unit: 'Hz' },
  { key: 'turns', label: 'Secondary turns', unit: 'turns' },
  { key: 'coreAreaMm2', label: 'Core cross-section', unit: 'mm²' },
  { key: 'pathLengthMm', label: 'Mean magnetic path', unit: 'mm' },
  { key: 'relativePermeability', label: 'Relative permeability μr', unit: '' },
  { key: 'airGapMm', label: 'Total air gap', unit: 'mm', hint: 'both cut faces together' },
  { key: 'saturationT', label: 'Saturation flux density', unit: 'T' },
  { key: 'windingResistanceOhm', label: 'Winding resistance', unit: 'Ω', optional: true },
  { key: 'loadOhm', label: 'Load resistance', unit: 'Ω', optional: true, hint: 'blank = the maximum-power load' },
];

function harvestBody(si: Record<string, number | string | undefined>) {
  const { currentA, frequencyHz, loadOhm, ...core } = si;
  return { currentA, frequencyHz, loadOhm, harvester: core };
}

function HarvestCalculator({ system }: { system: UnitSystem }) {
  const k = DEMO_HARVESTERS[0];
  const f = useFieldValues(HARVEST_FIELDS, { currentA: 700, frequencyHz: 60, ...k, loadOhm: undefined }, system);
  const body = harvestBody(toSi(HARVEST_FIELDS, f.values, system));
  const parsed = harvestCalcSchema.safeParse(body);
  const preview = parsed.success ? harvest(parsed.data) : null;
  const curve = useMemo(
    () => (parsed.success ? harvestCurve({ ...parsed.data.harvester, converterEfficiency: 1 }, parsed.data.frequencyHz, Math.max(100, parsed.data.currentA * 2), 60) : null),
    [JSON.stringify(parsed.success ? parsed.data : null)],
  );
  const server = useMutation({ mutationFn: (b: unknown) => api.post<HarvestCalcResult>('/api/calc/harvest', b) });
  const issues = parsed.success ? (server.error instanceof ApiError ? issuesByField(server.error.issues) : {}) : issuesByField(parsed.error.issues);

  return (
    <section className="card space-y-4" aria-labelledby="calc-harvest">
      <h2 id="calc-harvest" className="text-lg font-bold">Split-core harvester</h2>
      <div className="flex flex-wrap gap-2">
        {DEMO_HARVESTERS.map((h) => (
          <button key={h.id} type="button" className="btn-ghost" onClick={() => { f.load({ ...h }); server.reset(); }}>
            {h.name}
          </button>
        ))}
      </div>
      <NumberFields specs={HARVEST_FIELDS} values={f.values} onChange={(key, v) => { f.set(key, v); server.reset(); }} system={system} issues={issues} idPrefix="harvest" />
      {preview && (
        <dl className="grid grid-cols-2 gap-3 sm:grid-cols-5" data-testid="harvest-preview">
          <div><dt className="text-sm text-ink-700">Power into the load</dt><dd className="text-lg font-bold">{formatQuantity(preview.powerW, 'power', system)}</dd></div>
          <div><dt className="text-sm text-ink-700">Optimal load</dt><dd className="text-lg font-bold">{fmt(preview.optimalLoadOhm)} Ω</dd></div>
          <div><dt className="text-sm text-ink-700">Load voltage (rms)</dt><dd className="text-lg font-bold">{fmt(preview.loadVoltageRmsV)} V</dd></div>
          <div><dt className="text-sm text-ink-700">Peak core flux</dt><dd className="text-lg font-bold">{fmt(preview.peakFluxDensityT, 3)} T</dd></div>
          <div><dt className="text-sm text-ink-700">Core</dt><dd className={`text-lg font-bold ${preview.saturated ? 'text-brass-700' : 'text-go'}`}>{preview.saturated ? 'saturated' : 'linear'}</dd></div>
        </dl>
      )}
      {curve && (
        <div className="h-64 w-full" role="img" aria-label="Load power against line current">
          <ResponsiveContainer width="100%" height="100%">
            <LineChart data={curve.points.map((p) => ({ currentA: Math.round(p.currentA), powerW: +p.powerW.toFixed(2) }))} margin={{ left: 8, right: 24, top: 16, bottom: 8 }}>
              <CartesianGrid stroke="#dce9ea" />
              <XAxis dataKey="currentA" type="number" unit=" A" />
              <YAxis unit=" W" width={64} />
              <Tooltip formatter={(v) => [`${v} W`, 'power at the best load']} labelFormatter={(a) => `${a} A`} />
              <Line dataKey="powerW" stroke="#1d4f57" strokeWidth={2} dot={false} isAnimationActive={false} />
              <ReferenceLine x={Math.round(curve.saturationOnsetA)} stroke="#b3261e" strokeDasharray="5 4" label={{ value: `saturation from ${Math.round(curve.saturationOnsetA)} A`, position: 'insideTopLeft', fill: '#b3261e', fontSize: 12 }} />
            </LineChart>
          </ResponsiveContainer>
        </div>
      )}
      <div className="flex flex-wrap items-center gap-3">
        <button type="button" className="btn-primary" disabled={!parsed.success || server.isPending} onClick={() => server.mutate(body)}>
          Check on the server
        </button>
        <ServerCheck result={server.data} error={server.error} pending={server.isPending} render={(r) => `${fmt(r.powerW)} W at ${fmt(r.optimalLoadOhm)} Ω, ${fmt(r.peakFluxDensityT, 3)} T${r.saturated ? ', saturated' : ''}`} />
      </div>
      <p className="text-sm text-ink-700">Magnetic-circuit model of a current transformer with an air gap and a saturation bound (power into the load, before the converter).</p>
    </section>
  );
}

// ——— conductor thermal (IEEE 738) ———
const CONDUCTOR_FIELDS: FieldSpec[] = [
  { key: 'diameterMm', label: 'Outside diameter', kind: 'diameter' },
  { key: 'resistanceLowOhmPerM', label: 'AC resistance at the low temperature', kind: 'resistance-per-length' },
  { key: 'tempLowC', label: 'Low temperature', kind: 'temperature' },
  { key: 'resistanceHighOhmPerM', label: 'AC resistance at the high temperature', kind: 'resistance-per-length' },
  { key: 'tempHighC', label: 'High temperature', kind: 'temperature' },
  { key: 'emissivity', label: 'Emissivity', unit: '0–1' },
  { key: 'absorptivity', label: 'Solar absorptivity', unit: '0–1' },
];
const WEATHER_FIELDS: FieldSpec[] = [
  { key: 'ambientC', label: 'Air temperature', kind: 'temperature' },
  { key: 'windSpeedMps', label: 'Wind speed', kind: 'speed' },
  { key: 'windAngleDeg', label: 'Wind to conductor angle', unit: '°', hint: '90 = perpendicular' },
  { key: 'elevationM', label: 'Elevation', kind: 'length' },
  { key: 'latitudeDeg', label: 'Latitude', unit: '°' },
  { key: 'lineAzimuthDeg', label: 'Line azimuth', unit: '°', hint: '0 = north–south, 90 = east–west' },
  { key: 'dayOfYear', label: 'Day of year', unit: '1–366' },
  { key: 'solarHour', label: 'Solar time', unit: 'h' },
];
const LOAD_FIELDS: FieldSpec[] = [
  { key: 'currentA', label: 'Current (for the conductor temperature)', kind: 'current', optional: true },
  { key: 'maxConductorC', label: 'Maximum conductor temperature (for the ampacity)', kind: 'temperature', optional: true },
];
// IEEE Std 738-2012 sample case: Drake 26/7 ACSR in 40 °C air, 0.61 m/s crosswind, 30° N, 10 June 11:00, clear sky.
const IEEE_SAMPLE = {
  conductor: { diameterMm: 28.14, resistanceLowOhmPerM: 7.283e-5, tempLowC: 25, resistanceHighOhmPerM: 8.688e-5, tempHighC: 75, emissivity: 0.8, absorptivity: 0.8 },
  weather: { ambientC: 40, windSpeedMps: 0.61, windAngleDeg: 90, elevationM: 0, latitudeDeg: 30, lineAzimuthDeg: 90, dayOfYear: 161, solarHour: 11 },
  load: { currentA: undefined, maxConductorC: 100 },
};

function ThermalCalculator({ system }: { system: UnitSystem }) {
  const c = useFieldValues(CONDUCTOR_FIELDS, IEEE_SAMPLE.conductor, system);
  const w = useFieldValues(WEATHER_FIELDS, IEEE_SAMPLE.weather, system);
  const l = useFieldValues(LOAD_FIELDS, IEEE_SAMPLE.load, system);
  const [atmosphere, setAtmosphere] = useState<'clear' | 'industrial'>('clear');
  const body = { conductor: toSi(CONDUCTOR_FIELDS, c.values, system), weather: { ...toSi(WEATHER_FIELDS, w.values, system), atmosphere }, ...toSi(LOAD_FIELDS, l.values, system) };
  const parsed = conductorThermalCalcSchema.safeParse(body);
  const preview = parsed.success ? conductorThermal(parsed.data) : null;
  const server = useMutation({ mutationFn: (b: unknown) => api.post<ConductorThermalCalcResult>('/api/calc/conductor-thermal', b) });
  const zodIssues = parsed.success ? [] : parsed.error.issues;
  const issues = parsed.success ? (server.error instanceof ApiError ? issuesByField(server.error.issues) : {}) : issuesByField(zodIssues);
  const reset = () => server.reset();

  return (
    <section className="card space-y-4" aria-labelledby="calc-thermal">
      <h2 id="calc-thermal" className="text-lg font-bold">Conductor temperature and ampacity (IEEE Std 738-2012)</h2>
      <div className="flex flex-wrap items-end gap-2">
        <button type="button" className="btn-ghost" onClick={() => { c.load(IEEE_SAMPLE.conductor); w.load(IEEE_SAMPLE.weather); l.load(IEEE_SAMPLE.load); setAtmosphere('clear'); reset(); }}>
          IEEE 738 sample (Drake)
        </button>
        <label className="block">
          <span className="field-label">Conductor from the ACSR table</span>
          <select className="field-input" defaultValue="" onChange={(e) => { const row = ACSR_CONDUCTORS.find((r) => r.codeWord === e.target.value); if (row) c.load(thermalConductorOf(row, { emissivity: 0.5, absorptivity: 0.5 })); reset(); }}>
            <option value="">—</option>
            {ACSR_CONDUCTORS.map((r) => (
              <option key={r.codeWord} value={r.codeWord}>{r.codeWord} ({r.size} {r.stranding})</option>
            ))}
          </select>
        </label>
      </div>
      <h3 className="font-semibold">Conductor</h3>
      <NumberFields specs={CONDUCTOR_FIELDS} values={c.values} onChange={(k, v) => { c.set(k, v); reset(); }} system={system} issues={issues} idPrefix="thermal-c" />
      <h3 className="font-semibold">Weather and sun</h3>
      <NumberFields specs={WEATHER_FIELDS} values={w.values} onChange={(k, v) => { w.set(k, v); reset(); }} system={system} issues={issues} idPrefix="thermal-w" />
      <label className="block max-w-xs">
        <span className="field-label">Atmosphere</span>
        <select className="field-input" value={atmosphere} onChange={(e) => { setAtmosphere(e.target.value as 'clear' | 'industrial'); reset(); }}>
          <option value="clear">clear</option>
          <option value="industrial">industrial</option>
        </select>
      </label>
      <h3 className="font-semibold">Load</h3>
      <NumberFields specs={LOAD_FIELDS} values={l.values} onChange={(k, v) => { l.set(k, v); reset(); }} system={system} issues={issues} idPrefix="thermal-l" />
      {preview && (
        <dl className="grid grid-cols-2 gap-3 sm:grid-cols-5" data-testid="thermal-preview">
          <div><dt className="text-sm text-ink-700">Ampacity</dt><dd className="text-lg font-bold">{formatQuantity(preview.ampacityA, 'current', system)}</dd></div>
          <div><dt className="text-sm text-ink-700">Conductor temperature</dt><dd className="text-lg font-bold">{formatQuantity(preview.conductorTempC, 'temperature', system)}</dd></div>
          <div><dt className="text-sm text-ink-700">Convection qc</dt><dd className="text-lg font-bold">{fmt(preview.heat.convectionWPerM)} W/m</dd></div>
          <div><dt className="text-sm text-ink-700">Radiation qr</dt><dd className="text-lg font-bold">{fmt(preview.heat.radiationWPerM)} W/m</dd></div>
          <div><dt className="text-sm text-ink-700">Solar qs</dt><dd className="text-lg font-bold">{fmt(preview.heat.solarWPerM)} W/m</dd></div>
        </dl>
      )}
      <Caution compact />
      <div className="flex flex-wrap items-center gap-3">
        <button type="button" className="btn-primary" disabled={!parsed.success || server.isPending} onClick={() => server.mutate(body)}>
          Check on the server
        </button>
        <ServerCheck
          result={server.data}
          error={server.error}
          pending={server.isPending}
          render={(r) => [r.ampacityA !== undefined ? `ampacity ${fmt(r.ampacityA, 0)} A` : null, r.conductorTempC !== undefined ? `conductor ${fmt(r.conductorTempC, 1)} °C` : null].filter(Boolean).join(', ')}
        />
      </div>
    </section>
  );
}

// ——— bench test ———
const BENCH_FIELDS: FieldSpec[] = [
  { key: 'fixtureTurns', label: 'Fixture turns through the core', unit: 'turns' },
  { key: 'fixtureCurrentA', label: 'Fixture current', kind: 'current' },
  { key: 'loadVoltageRmsV', label: 'RMS voltage across the load', unit: 'V' },
  { key: 'loadOhm', label: 'Load resistance', unit: 'Ω' },
];

function BenchCalculator({ system }: { system: UnitSystem }) {
  const f = useFieldValues(BENCH_FIELDS, { fixtureTurns: 60, fixtureCurrentA: 11.7, loadVoltageRmsV: 58, loadOhm: 40 }, system);
  const body = toSi(BENCH_FIELDS, f.values, system);
  const parsed = benchTestCalcSchema.safeParse(body);
  const preview = parsed.success ? benchTest(parsed.data) : null;
  const server = useMutation({ mutationFn: (b: unknown) => api.post<BenchTestCalcResult>('/api/calc/bench-test', b) });
  const issues = parsed.success ? (server.error instanceof ApiError ? issuesByField(server.error.issues) : {}) : issuesByField(parsed.error.issues);
  return (
    <section className="card space-y-4" aria-labelledby="calc-bench">
      <h2 id="calc-bench" className="text-lg font-bold">Bench test</h2>
      <NumberFields specs={BENCH_FIELDS} values={f.values} onChange={(k, v) => { f.set(k, v); server.reset(); }} system={system} issues={issues} idPrefix="bench" />
      {preview && (
        <dl className="grid grid-cols-2 gap-3" data-testid="bench-preview">
          <div><dt className="text-sm text-ink-700">Equivalent line current</dt><dd className="text-lg font-bold">{formatQuantity(preview.equivalentLineCurrentA, 'current', system)}</dd></div>
          <div><dt className="text-sm text-ink-700">Power into the load</dt><dd className="text-lg font-bold">{formatQuantity(preview.powerW, 'power', system)}</dd></div>
        </dl>
      )}
      <div className="flex flex-wrap items-center gap-3">
        <button type="button" className="btn-primary" disabled={!parsed.success || server.isPending} onClick={() => server.mutate(body)}>
          Check on the server
        </button>
        <ServerCheck result={server.data} error={server.error} pending={server.isPending} render={(r) => `${fmt(r.equivalentLineCurrentA, 1)} A, ${fmt(r.powerW, 1)} W`} />
      </div>
      <p className="text-sm text-ink-700">The fixture's turns times its current stand for the line current; the power into the load is V²/R.</p>
    </section>
  );
}

export function CalculatorsPage() {
  const me = useMe();
  return (
    <div className="space-y-4">
      <h1 className="page-title">Calculators</h1>
      <p className="text-ink-700">Results update as you type; "Check on the server" runs the same method on the server, which is the authority for stored assessments.</p>
      <HarvestCalculator system={me.unitSystem} />
      <ThermalCalculator system={me.unitSystem} />
      <BenchCalculator system={me.unitSystem} />
    </div>
  );
}
