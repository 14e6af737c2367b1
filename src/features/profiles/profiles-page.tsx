// Admin: harvester and drone profiles (versioned), bench tests against the model curve, and the gap fit.
import { useState } from 'react';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { CartesianGrid, ComposedChart, Legend, Line, ResponsiveContainer, Scatter, Tooltip, XAxis, YAxis } from 'recharts';
import {
  benchTestCreateSchema,
  CORE_MATERIALS,
  droneProfileCreateSchema,
  harvesterProfileCreateSchema,
  type DroneProfileView,
  type FitGapResult,
  type HarvesterProfileView,
} from '#shared/schemas/assessment.ts';
import { harvest } from '#shared/engineering/ct-harvester.ts';
import { formatQuantity, type UnitSystem } from '#shared/units.ts';
import { Caution } from '../../components/caution.tsx';
import { api, ApiError } from '../../lib/api.ts';
import { useMe } from '../auth/queries.ts';
import { issuesByField, NumberFields, toSi, useFieldValues, type FieldSpec } from '../calculators/number-fields.tsx';
import { JobProgress } from './job-progress.tsx';
import { profileApi, profileQueries } from './queries.ts';

const HARVESTER_FIELDS: FieldSpec[] = [
  { key: 'turns', label: 'Secondary turns', unit: 'turns' },
  { key: 'coreAreaMm2', label: 'Core cross-section', unit: 'mm²' },
  { key: 'pathLengthMm', label: 'Mean magnetic path', unit: 'mm' },
  { key: 'relativePermeability', label: 'Relative permeability μr', unit: '' },
  { key: 'airGapMm', label: 'Total air gap', unit: 'mm' },
  { key: 'saturationT', label: 'Saturation flux density', unit: 'T' },
  { key: 'windingResistanceOhm', label: 'Winding resistance', unit: 'Ω' },
  { key: 'converterEfficiency', label: 'Converter efficiency', unit: '0–1' },
  { key: 'massKg', label: 'Mass', kind: 'mass' },
  { key: 'gripperMinDiameterMm', label: 'Gripper, smallest conductor', kind: 'diameter' },
  { key: 'gripperMaxDiameterMm', label: 'Gripper, largest conductor', kind: 'diameter' },
  { key: 'contactTempLimitC', label: 'Contact temperature limit', kind: 'temperature' },
  { key: 'usefulMinHarvestW', label: 'Useful minimum harvest', kind: 'power' },
  { key: 'sortOrder', label: 'Order (0 = default first)', unit: '' },
];
const DRONE_FIELDS: FieldSpec[] = [
  { key: 'batteryWh', label: 'Battery energy', kind: 'energy' },
  { key: 'reservePercent', label: 'Reserve kept', unit: '%' },
  { key: 'cruiseSpeedMps', label: 'Cruise speed', kind: 'speed' },
  { key: 'windLimitMps', label: 'Wind limit', kind: 'speed' },
  { key: 'payloadKg', label: 'Payload', kind: 'mass' },
  { key: 'approachClearanceM', label: 'Approach clearance needed', kind: 'length' },
  { key: 'cruisePowerW', label: 'Power at cruise airspeed', kind: 'power', hint: 'Electrical power the drone draws in level flight' },
  { key: 'perchManoeuvreWh', label: 'Energy per perch (approach, dock, leave)', kind: 'energy' },
  { key: 'chargeEfficiency', label: 'Battery charge efficiency', unit: '0–1', hint: 'Share of harvested energy stored; 0.95 is typical' },
  { key: 'chargeToPercent', label: 'Charge to, on a perch', unit: '%', hint: 'The drone leaves a perch at this charge' },
  { key: 'sortOrder', label: 'Order (0 = default first)', unit: '' },
];
const BENCH_FIELDS: FieldSpec[] = [
  { key: 'fixtureTurns', label: 'Fixture turns', unit: 'turns' },
  { key: 'fixtureCurrentA', label: 'Fixture current', kind: 'current' },
  { key: 'loadVoltageRmsV', label: 'RMS voltage across the load', unit: 'V' },
  { key: 'loadOhm', label: 'Load resistance', unit: 'Ω' },
  { key: 'frequencyHz', label: 'Frequency', unit: 'Hz' },
];

function errorText(err: unknown) {
  return err instanceof ApiError ? err.message : err ? 'The server could not be reached' : null;
}

type Kind = 'harvester' | 'drone';

function ProfileForm({
  kind,
  initial,
  system,
  onDone,
}: {
  kind: Kind;
  initial: HarvesterProfileView | DroneProfileView | null;
  system: UnitSystem;
  onDone: (jobId: string | null) => void;
}) {
  const specs = kind === 'harvester' ? HARVESTER_FIELDS : DRONE_FIELDS;
  const qc = useQueryClient();
  const f = useFieldValues(specs, (initial ?? (kind === 'drone' ? { sortOrder: 10, chargeEfficiency: 0.95, chargeToPercent: 100 } : { sortOrder: 10 })) as unknown as Record<string, number>, system);
  const [name, setName] = useState(initial?.name ?? '');
  const [active, setActive] = useState(initial?.active ?? true);
  const [coreMaterial, setCoreMaterial] = useState<string>((initial as HarvesterProfileView | null)?.coreMaterial ?? 'si-steel');
  const body = { ...toSi(specs, f.values, system), name, active, ...(kind === 'harvester' ? { coreMaterial } : {}) };
  const schema = kind === 'harvester' ? harvesterProfileCreateSchema : droneProfileCreateSchema;
  const parsed = schema.safeParse(body);
  const save = useMutation({
    mutationFn: async () => {
      if (!parsed.success) throw new Error('invalid');
      const data = parsed.data as never;
      if (kind === 'harvester') return initial ? profileApi.updateHarvester(initial.id, { ...(data as object), version: initial.version }) : profileApi.createHarvester(data);
      return initial ? profileApi.updateDrone(initial.id, { ...(data as object), version: initial.version }) : profileApi.createDrone(data);
    },
    onSuccess: (res) => {
      void qc.invalidateQueries({ queryKey: profileQueries.all() });
      onDone(res.rescoreJobId);
    },
  });
  const [touched, setTouched] = useState(false);
  const issues = save.error instanceof ApiError ? issuesByField(save.error.issues) : touched && !parsed.success ? issuesByField(parsed.error.issues) : {};
  return (
    <form
      className="space-y-3 rounded-lg border border-ink-200 p-3"
      onSubmit={(e) => {
        e.preventDefault();
        setTouched(true);
        if (parsed.success) save.mutate();
      }}
      aria-label={initial ? `Edit ${initial.name}` : `New ${kind} profile`}
    >
      <div className="grid grid-cols-1 gap-3 sm:grid-cols-3">
        <div>
          <label className="field-label" htmlFor={`${kind}-name`}>Name</label>
          <input id={`${kind}-name`} className="field-input" value={name} onChange={(e) => setName(e.target.value)} />
          {issues.name && <p className="field-error">{issues.name}</p>}
        </div>
        {kind === 'harvester' && (
          <div>
            <label className="field-label" htmlFor="harvester-material">Core material</label>
            <select id="harvester-material" className="field-input" value={coreMaterial} onChange={(e) => setCoreMaterial(e.target.value)}>
              {CORE_MATERIALS.map((m) => <option key={m} value={m}>{m}</option>)}
            </select>
          </div>
        )}
        <label className="flex items-center gap-2 pt-6">
          <input type="checkbox" className="h-5 w-5" checked={active} onChange={(e) => setActive(e.target.checked)} />
          <span className="font-semibold">Active (assessed for every span)</span>
        </label>
      </div>
      <NumberFields specs={specs} values={f.values} onChange={f.set} system={system} issues={issues} idPrefix={kind} />
      {kind === 'harvester' && <Caution compact />}
      {errorText(save.error) && <p className="field-error">{errorText(save.error)}</p>}
      <div className="flex gap-2">
        <button type="submit" className="btn-primary" disabled={save.isPending}>{initial ? `Save as version ${initial.version + 1}` : 'Create profile'}</button>
        <button type="button" className="btn-ghost" onClick={() => onDone(null)}>Cancel</button>
      </div>
    </form>
  );
}

function BenchTests({ harvester, system, onJob }: { harvester: HarvesterProfileView; system: UnitSystem; onJob: (id: string | null) => void }) {
  const qc = useQueryClient();
  const tests = useQuery(profileQueries.benchTests(harvester.id));
  const f = useFieldValues(BENCH_FIELDS, { fixtureTurns: 60, fixtureCurrentA: 11.7, loadVoltageRmsV: 58, loadOhm: 40, frequencyHz: 60 }, system);
  const [note, setNote] = useState('');
  const body = { ...toSi(BENCH_FIELDS, f.values, system), note: note || null };
  const parsed = benchTestCreateSchema.safeParse(body);
  const invalidate = () => qc.invalidateQueries({ queryKey: profileQueries.all() });
  const add = useMutation({ mutationFn: () => profileApi.addBenchTest(harvester.id, parsed.success ? parsed.data : (body as never)), onSuccess: () => void invalidate() });
  const remove = useMutation({ mutationFn: (id: string) => profileApi.deleteBenchTest(harvester.id, id), onSuccess: () => void invalidate() });
  const [fit, setFit] = useState<FitGapResult | null>(null);
  const fitGap = useMutation({
    mutationFn: (apply: boolean) => profileApi.fitGap(harvester.id, { apply, version: harvester.version }),
    onSuccess: (res) => {
      setFit(res);
      if (res.applied) {
        void invalidate();
        onJob(res.rescoreJobId);
      }
    },
  });
  const issues = add.error instanceof ApiError ? issuesByField(add.error.issues) : parsed.success ? {} : issuesByField(parsed.error.issues);
  const items = tests.data ?? [];
  // The model curve at the load and frequency of the latest test, over the measured range.
  const ref = items[items.length - 1];
  const maxA = Math.max(100, ...items.map((t) => t.equivalentLineCurrentA)) * 1.15;
  const modelCurve = ref
    ? Array.from({ length: 41 }, (_, i) => {
        const a = (maxA * i) / 40;
        return { currentA: Math.round(a), modelW: +harvest({ currentA: a, frequencyHz: ref.frequencyHz, loadOhm: ref.loadOhm, harvester }).powerW.toFixed(2) };
      })
    : [];
  const measured = items.map((t) => ({ currentA: Math.round(t.equivalentLineCurrentA), measuredW: +t.powerW.toFixed(2) }));

  return (
    <section className="card space-y-3" aria-labelledby="bench-title">
      <h2 id="bench-title" className="text-lg font-bold">Bench tests — {harvester.name} (v{harvester.version})</h2>
      {items.length > 0 && (
        <div className="h-72 w-full" data-testid="bench-chart" role="img" aria-label="Measured bench power against the profile's model">
          <ResponsiveContainer width="100%" height="100%">
            <ComposedChart margin={{ left: 8, right: 16, top: 8, bottom: 8 }}>
              <CartesianGrid stroke="#dce9ea" />
              <XAxis dataKey="currentA" type="number" unit=" A" domain={[0, 'dataMax']} allowDuplicatedCategory={false} />
              <YAxis unit=" W" width={64} />
              <Tooltip />
              <Legend />
              <Line data={modelCurve} dataKey="modelW" name={`model at ${ref?.loadOhm} Ω`} stroke="#1d4f57" dot={false} strokeWidth={2} isAnimationActive={false} />
              <Scatter data={measured} dataKey="measuredW" name="measured" fill="#c98f28" isAnimationActive={false} />
            </ComposedChart>
          </ResponsiveContainer>
        </div>
      )}
      <table className="w-full text-sm">
        <thead>
          <tr className="text-left text-ink-700">
            <th>Turns × current</th><th className="text-right">Equivalent line current</th><th className="text-right">V rms / Ω</th><th className="text-right">Measured</th><th className="text-right">Model</th><th className="text-right">Deviation</th><th />
          </tr>
        </thead>
        <tbody>
          {items.map((t) => (
            <tr key={t.id} className="border-t border-ink-100">
              <td>{t.fixtureTurns} × {formatQuantity(t.fixtureCurrentA, 'current', system, { digits: 1 })}</td>
              <td className="text-right">{formatQuantity(t.equivalentLineCurrentA, 'current', system)}</td>
              <td className="text-right">{t.loadVoltageRmsV} V / {t.loadOhm} Ω</td>
              <td className="text-right">{formatQuantity(t.powerW, 'power', system)}</td>
              <td className="text-right">{formatQuantity(t.modelPowerW, 'power', system)}</td>
              <td className={`text-right font-semibold ${Math.abs(t.deviationPercent ?? 0) > 10 ? 'text-alarm' : ''}`}>
                {t.deviationW >= 0 ? '+' : ''}{t.deviationW.toFixed(1)} W{t.deviationPercent !== null ? ` (${t.deviationPercent >= 0 ? '+' : ''}${t.deviationPercent.toFixed(1)} %)` : ''}
              </td>
              <td className="text-right"><button type="button" className="text-alarm underline" onClick={() => remove.mutate(t.id)}>Delete</button></td>
            </tr>
          ))}
          {items.length === 0 && <tr><td colSpan={7} className="py-2 text-ink-700">No bench tests yet.</td></tr>}
        </tbody>
      </table>
      <form className="space-y-2" onSubmit={(e) => { e.preventDefault(); if (parsed.success) add.mutate(); }} aria-label="Add a bench test">
        <NumberFields specs={BENCH_FIELDS} values={f.values} onChange={f.set} system={system} issues={issues} idPrefix="benchtest" />
        <label className="block"><span className="field-label">Note</span><input className="field-input" value={note} onChange={(e) => setNote(e.target.value)} /></label>
        {errorText(add.error) && <p className="field-error">{errorText(add.error)}</p>}
        <button type="submit" className="btn-accent" disabled={!parsed.success || add.isPending}>Add bench test</button>
      </form>
      <div className="space-y-2 border-t border-ink-100 pt-3">
        <div className="flex flex-wrap gap-2">
          <button type="button" className="btn-ghost" disabled={items.length === 0 || fitGap.isPending} onClick={() => fitGap.mutate(false)}>Fit gap to bench data</button>
          {fit && !fit.applied && (
            <button type="button" className="btn-primary" disabled={fitGap.isPending} onClick={() => fitGap.mutate(true)}>
              Apply {fit.airGapMm.toPrecision(3)} mm as version {harvester.version + 1}
            </button>
          )}
        </div>
        {fit && (
          <p className="text-sm" data-testid="fit-result">
            Least-squares gap {fit.airGapMm.toPrecision(3)} mm (was {fit.previousAirGapMm.toPrecision(3)} mm) over {fit.points} point{fit.points === 1 ? '' : 's'}: rms error {fit.rmsErrorW.toFixed(2)} W (was {fit.previousRmsErrorW.toFixed(2)} W).
            {fit.applied ? ` Applied as version ${fit.profile.version}.` : ''}
          </p>
        )}
        {errorText(fitGap.error) && <p className="field-error">{errorText(fitGap.error)}</p>}
      </div>
    </section>
  );
}

export function ProfilesPage() {
  const me = useMe();
  const system = me.unitSystem;
  const qc = useQueryClient();
  const harvesters = useQuery(profileQueries.harvesters());
  const drones = useQuery(profileQueries.drones());
  const [editing, setEditing] = useState<{ kind: Kind; id: string | null } | null>(null);
  const [benchFor, setBenchFor] = useState<string | null>(null);
  const [jobId, setJobId] = useState<string | null>(null);
  const remove = useMutation({
    mutationFn: ({ kind, id }: { kind: Kind; id: string }) => (kind === 'harvester' ? profileApi.deleteHarvester(id) : profileApi.deleteDrone(id)),
    onSuccess: () => void qc.invalidateQueries({ queryKey: profileQueries.all() }),
  });
  const done = (job: string | null) => {
    setEditing(null);
    if (job) setJobId(job);
  };
  const bench = harvesters.data?.find((h) => h.id === benchFor) ?? null;

  const list = (kind: Kind, items: (HarvesterProfileView | DroneProfileView)[] | undefined, summary: (p: never) => string) => (
    <section className="card space-y-3" aria-labelledby={`${kind}s-title`}>
      <div className="flex items-center gap-3">
        <h2 id={`${kind}s-title`} className="text-lg font-bold">{kind === 'harvester' ? 'Harvester profiles' : 'Drone profiles'}</h2>
        <button type="button" className="btn-accent ml-auto" onClick={() => setEditing({ kind, id: null })}>New {kind}</button>
      </div>
      {editing?.kind === kind && editing.id === null && <ProfileForm kind={kind} initial={null} system={system} onDone={done} />}
      <ul className="space-y-2">
        {(items ?? []).map((p) => (
          <li key={p.id} className="rounded-lg border border-ink-100 p-3">
            <div className="flex flex-wrap items-center gap-2">
              <strong>{p.name}</strong>
              <span className="text-sm text-ink-700">v{p.version}</span>
              {!p.active && <span className="rounded bg-ink-100 px-2 text-sm">inactive</span>}
              <span className="text-sm text-ink-700">{summary(p as never)}</span>
              <span className="ml-auto flex gap-2">
                {kind === 'harvester' && <button type="button" className="btn-ghost" onClick={() => setBenchFor(p.id)}>Bench tests</button>}
                <button type="button" className="btn-ghost" onClick={() => setEditing({ kind, id: p.id })}>Edit</button>
                <button type="button" className="btn-danger" onClick={() => { if (window.confirm(`Delete ${p.name}? Its stored assessments go too.`)) remove.mutate({ kind, id: p.id }); }}>Delete</button>
              </span>
            </div>
            {editing?.kind === kind && editing.id === p.id && <ProfileForm kind={kind} initial={p} system={system} onDone={done} />}
          </li>
        ))}
      </ul>
    </section>
  );

  return (
    <div className="space-y-4">
      <h1 className="page-title">Equipment profiles</h1>
      <p className="text-ink-700">Every active harvester is assessed with every active drone on every span; the first of each (lowest order) is the default pair shown on span lists and the map. Saving a change makes a new version and rescores all spans.</p>
      {jobId && <JobProgress jobId={jobId} />}
      {errorText(remove.error) && <p className="field-error">{errorText(remove.error)}</p>}
      {list('harvester', harvesters.data, (h: HarvesterProfileView) => `${h.turns} turns, ${h.coreAreaMm2} mm², gap ${h.airGapMm.toPrecision(3)} mm, B_sat ${h.saturationT} T, gripper ${formatQuantity(h.gripperMinDiameterMm, 'diameter', system)}–${formatQuantity(h.gripperMaxDiameterMm, 'diameter', system)}`)}
      {list('drone', drones.data, (d: DroneProfileView) => `${d.batteryWh} Wh, reserve ${d.reservePercent} %, wind limit ${formatQuantity(d.windLimitMps, 'speed', system)}, cruise ${formatQuantity(d.cruisePowerW, 'power', system, { digits: 0 })}`)}
      {bench && <BenchTests key={bench.id} harvester={bench} system={system} onJob={setJobId} />}
      {bench && <FlightEvidence key={`f-${bench.id}`} harvester={bench} />}
    </div>
  );
}

interface FlightPerch {
  id: string;
  measuredW: number | null;
  meteredCurrentA: number | null;
  lineCurrentA: number | null;
  lineName: string | null;
}

/** Perches flown with this harvester: measured harvest at the line current of that moment, against the model. */
function FlightEvidence({ harvester }: { harvester: HarvesterProfileView }) {
  const q = useQuery({ queryKey: ['evidence', 'perches', 'harvester', harvester.id], queryFn: () => api.get<{ items: FlightPerch[] }>(`/api/evidence/perches?harvesterProfileId=${encodeURIComponent(harvester.id)}`) });
  const points = (q.data?.items ?? [])
    .filter((p) => p.measuredW !== null && (p.meteredCurrentA ?? p.lineCurrentA) !== null)
    .map((p) => ({ currentA: Math.round((p.meteredCurrentA ?? p.lineCurrentA)!), measuredW: +p.measuredW!.toFixed(1), metered: p.meteredCurrentA !== null }));
  const maxA = Math.max(100, ...points.map((p) => p.currentA)) * 1.15;
  // The converter's output at the maximum-power load, which is what a perched drone measures.
  const model = Array.from({ length: 41 }, (_, i) => {
    const a = (maxA * i) / 40;
    return { currentA: Math.round(a), modelW: +(harvest({ currentA: a, frequencyHz: 60, harvester }).powerW * harvester.converterEfficiency).toFixed(2) };
  });
  return (
    <section className="card space-y-2" aria-labelledby="flight-evidence-title">
      <h2 id="flight-evidence-title" className="text-lg font-bold">Flight evidence — {harvester.name}</h2>
      {points.length === 0 ? (
        <p className="text-ink-700">No perch flown with this harvester has a measured harvest yet. Upload flight records on the load evidence page.</p>
      ) : (
        <>
          <div className="h-72 w-full" role="img" aria-label="Measured perch harvest against the profile's model">
            <ResponsiveContainer width="100%" height="100%">
              <ComposedChart margin={{ left: 8, right: 16, top: 8, bottom: 8 }}>
                <CartesianGrid stroke="#dce9ea" />
                <XAxis dataKey="currentA" type="number" unit=" A" domain={[0, 'dataMax']} allowDuplicatedCategory={false} />
                <YAxis unit=" W" width={64} />
                <Tooltip />
                <Legend />
                <Line data={model} dataKey="modelW" name="model after the converter (60 Hz)" stroke="#1d4f57" dot={false} strokeWidth={2} isAnimationActive={false} />
                <Scatter data={points} dataKey="measuredW" name="measured on a perch" fill="#c98f28" isAnimationActive={false} />
              </ComposedChart>
            </ResponsiveContainer>
          </div>
          <p className="text-sm text-ink-700">Each point is one perch at the metered line current of that moment, or the estimate where the line has no series.</p>
        </>
      )}
    </section>
  );
}
