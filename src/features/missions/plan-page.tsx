// The plan screen (/missions/new, /missions/:id): base and target on the map or typed, drone, harvester, departure,
// wind, return and objective; the route, legs, perches and the charge chart; save as a mission, or replan one.
import { useEffect, useMemo, useState, type ReactNode } from 'react';
import { Link, useNavigate, useParams } from 'react-router';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { fromDisplay, toDisplay, unitLabel } from '#shared/units.ts';
import { Caution } from '../../components/caution.tsx';
import { ApiError } from '../../lib/api.ts';
import { useMe } from '../auth/queries.ts';
import { missionApi } from './api.ts';
import { MissionPanel } from './mission-panel.tsx';
import { PlanMap, type PlaceKind } from './plan-map.tsx';
import { ChargeChart, LegsTable, PerchTable, PlanSummary } from './plan-views.tsx';
import { missionQueries } from './queries.ts';
import { formatOffset, browserOffsetMinutes, infeasibleText, isoToLocalInput, localInputToIso, offsetOf, routeStops } from './transforms.ts';
import type { LatLon, Mission, MissionObjective, PlanRequest, PlanResult } from './types.ts';
import type { UnitSystem } from '#shared/units.ts';

type FeasiblePlan = Extract<PlanResult, { feasible: true }>;
import { missionRequest } from './plan-page-request.ts';

interface FormState {
  base: LatLon | null;
  target: LatLon | null;
  droneProfileId: string;
  harvesterProfileId: string;
  departLocal: string;
  windSpeed: string;
  windFrom: string;
  returnToBase: boolean;
  objective: MissionObjective;
  perchPoints: { spanId: string; alongM: number }[];
}

/** Moves one perch point along its span (distance from the from-structure, typed in the user's length unit), or puts it back at mid-span. */
function MovePerchPoint({ plan, system, onMove }: { plan: FeasiblePlan; system: UnitSystem; onMove: (spanId: string, alongM: number | null) => void }) {
  const perches = plan.perches.filter((p) => p.alongM !== undefined);
  const [spanId, setSpanId] = useState(perches[0]?.spanId ?? '');
  const chosen = perches.find((p) => p.spanId === spanId) ?? perches[0];
  const [along, setAlong] = useState('');
  useEffect(() => {
    if (chosen?.alongM !== undefined) setAlong(String(+toDisplay(chosen.alongM, 'length', system).toFixed(1)));
  }, [chosen?.spanId, chosen?.alongM, system]);
  if (!chosen) return null;
  const value = Number(along);
  const ok = along.trim() !== '' && Number.isFinite(value) && value >= 0;
  return (
    <form
      aria-label="Move a perch point"
      className="flex flex-wrap items-end gap-2 border-t border-ink-100 pt-3"
      onSubmit={(e) => {
        e.preventDefault();
        if (ok) onMove(chosen.spanId, fromDisplay(value, 'length', system));
      }}
    >
      <div>
        <label className="field-label" htmlFor="move-perch">Move a perch point</label>
        <select id="move-perch" className="field-input min-h-12" value={chosen.spanId} onChange={(e) => setSpanId(e.target.value)}>
          {perches.map((p, i) => (
            <option key={p.spanId} value={p.spanId}>Perch {i + 1}: {p.lineName} {p.fromStructureLabel}–{p.toStructureLabel}</option>
          ))}
        </select>
      </div>
      <div>
        <label className="field-label" htmlFor="move-perch-along">Distance from {chosen.fromStructureLabel ?? 'the from-structure'} ({unitLabel('length', system)})</label>
        <input id="move-perch-along" className="field-input min-h-12 w-40" inputMode="decimal" value={along} onChange={(e) => setAlong(e.target.value)} />
      </div>
      <button type="submit" className="btn-ghost min-h-12" disabled={!ok}>Move and plan again</button>
      {chosen.perchPoint === 'planner' && (
        <button type="button" className="btn-ghost min-h-12" onClick={() => onMove(chosen.spanId, null)}>Back to mid-span</button>
      )}
      <p className="w-full text-xs text-ink-700">The span's gates were assessed at its surveyed perch point; check the clearance where you move it.</p>
    </form>
  );
}

function defaultDeparture() {
  const d = new Date(Date.now() + 24 * 3600_000);
  d.setHours(9, 0, 0, 0);
  return isoToLocalInput(d.toISOString());
}

function CoordFields({ label, value, onChange, id }: { label: string; value: LatLon | null; onChange: (v: LatLon | null) => void; id: string }) {
  const [lat, setLat] = useState(value ? String(value.lat) : '');
  const [lon, setLon] = useState(value ? String(value.lon) : '');
  useEffect(() => {
    setLat(value ? String(value.lat) : '');
    setLon(value ? String(value.lon) : '');
  }, [value?.lat, value?.lon]); // eslint-disable-line react-hooks/exhaustive-deps
  const commit = (la: string, lo: string) => {
    const a = Number(la), o = Number(lo);
    if (la.trim() !== '' && lo.trim() !== '' && Number.isFinite(a) && Number.isFinite(o) && Math.abs(a) <= 90 && Math.abs(o) <= 180) onChange({ lat: a, lon: o });
  };
  return (
    <fieldset className="grid grid-cols-2 gap-2">
      <legend className="field-label">{label}</legend>
      <div>
        <label className="text-xs text-ink-700" htmlFor={`${id}-lat`}>{label} latitude (°)</label>
        <input id={`${id}-lat`} className="field-input" inputMode="decimal" value={lat} onChange={(e) => { setLat(e.target.value); commit(e.target.value, lon); }} />
      </div>
      <div>
        <label className="text-xs text-ink-700" htmlFor={`${id}-lon`}>{label} longitude (°)</label>
        <input id={`${id}-lon`} className="field-input" inputMode="decimal" value={lon} onChange={(e) => { setLon(e.target.value); commit(lat, e.target.value); }} />
      </div>
    </fieldset>
  );
}

/** Where another feature shows what was flown against a saved mission. */
export type MissionFlownSlot = (mission: Mission) => ReactNode;

export function PlanPage({ flownSlot }: { flownSlot?: MissionFlownSlot } = {}) {
  const { id } = useParams();
  const me = useMe();
  const system = me.unitSystem;
  const qc = useQueryClient();
  const navigate = useNavigate();
  const canPlan = me.roles.includes('planner');
  const mission = useQuery(missionQueries.detail(id ?? ''));
  const drones = useQuery(missionQueries.drones());
  const harvesters = useQuery(missionQueries.harvesters());
  const lines = useQuery(missionQueries.lines());
  const [form, setForm] = useState<FormState>({
    base: null, target: null, droneProfileId: '', harvesterProfileId: '', departLocal: defaultDeparture(),
    windSpeed: '0', windFrom: '270', returnToBase: false, objective: 'time', perchPoints: [],
  });
  const [placing, setPlacing] = useState<PlaceKind>('base');
  const [plan, setPlan] = useState<PlanResult | null>(null);
  const [name, setName] = useState('');
  const [loadedFrom, setLoadedFrom] = useState<string | null>(null);

  // Reopening a mission shows every input it was planned with, and its plan.
  useEffect(() => {
    const m = mission.data;
    if (!m || loadedFrom === `${m.id}:${m.updatedAt ?? ''}`) return;
    const r = missionRequest(m);
    setForm((f) => ({
      ...f,
      base: r.base ?? null,
      target: r.target ?? null,
      droneProfileId: r.droneProfileId ?? '',
      harvesterProfileId: r.harvesterProfileId ?? '',
      departLocal: isoToLocalInput(r.departAt) || f.departLocal,
      windSpeed: r.wind ? String(+toDisplay(r.wind.speedMps, 'speed', system).toPrecision(4)) : '0',
      windFrom: r.wind ? String(r.wind.fromDeg) : '270',
      returnToBase: r.returnToBase ?? false,
      objective: r.objective ?? 'time',
      perchPoints: r.perchPoints ?? [],
    }));
    setPlan(m.plan);
    setName(m.name);
    setLoadedFrom(`${m.id}:${m.updatedAt ?? ''}`);
  }, [mission.data, loadedFrom, system]);

  // Default drone and harvester: the first active of each (the server lists the default first).
  useEffect(() => {
    setForm((f) => ({
      ...f,
      droneProfileId: f.droneProfileId || drones.data?.find((d) => d.active)?.id || '',
      harvesterProfileId: f.harvesterProfileId || harvesters.data?.find((h) => h.active)?.id || '',
    }));
  }, [drones.data, harvesters.data]);

  const departAt = localInputToIso(form.departLocal);
  const request: PlanRequest | null =
    form.base && form.target && departAt && form.droneProfileId && form.harvesterProfileId
      ? {
          droneProfileId: form.droneProfileId,
          harvesterProfileId: form.harvesterProfileId,
          base: form.base,
          target: form.target,
          departAt,
          wind: { speedMps: fromDisplay(Number(form.windSpeed) || 0, 'speed', system), fromDeg: ((Number(form.windFrom) || 0) % 360 + 360) % 360 },
          returnToBase: form.returnToBase,
          objective: form.objective,
          ...(form.perchPoints.length ? { perchPoints: form.perchPoints } : {}),
        }
      : null;

  const planIt = useMutation({ mutationFn: (r: PlanRequest) => missionApi.plan(r), onSuccess: setPlan });
  const save = useMutation({
    mutationFn: (r: PlanRequest) => missionApi.create({ ...r, name: name.trim() }),
    onSuccess: (m) => {
      void qc.invalidateQueries({ queryKey: missionQueries.all() });
      navigate(`/missions/${m.id}`);
    },
  });
  const replan = useMutation({
    mutationFn: (r: PlanRequest) => missionApi.replan(id!, { ...r, name: name.trim() || undefined, version: mission.data?.version }),
    onSuccess: (m) => {
      qc.setQueryData(missionQueries.detail(m.id).queryKey, m);
      void qc.invalidateQueries({ queryKey: missionQueries.all() });
      setPlan(m.plan);
    },
  });

  const onPlace = (kind: PlaceKind, at: LatLon) => {
    setForm((f) => ({ ...f, [kind]: at }));
    if (kind === 'base' && !form.target) setPlacing('target');
  };

  const drone = drones.data?.find((d) => d.id === form.droneProfileId);
  const offset = (plan?.feasible && plan.departAt && offsetOf(plan.departAt)) || (departAt && offsetOf(departAt)) || formatOffset(browserOffsetMinutes(form.departLocal));
  const stops = useMemo(
    () => (plan?.feasible && form.base && form.target ? routeStops(plan, form.base, form.target, form.returnToBase) : []),
    [plan, form.base, form.target, form.returnToBase],
  );
  if (id && mission.isPending) return <p className="p-8 text-center text-ink-700">Loading the mission…</p>;
  if (id && mission.error) throw mission.error;
  const errorOf = (e: unknown) => (e instanceof ApiError ? e.message : e ? 'The server could not be reached' : null);
  const planError = planIt.error instanceof ApiError ? planIt.error : null;
  const field = 'field-input min-h-12';

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center gap-3">
        <Link to="/missions" className="text-sm font-semibold text-ink-700 underline">← Missions</Link>
        <h1 className="page-title">{mission.data ? mission.data.name : 'Plan a mission'}</h1>
      </div>
      <Caution mission />
      {mission.data && <MissionPanel mission={mission.data} />}
      <div className="grid gap-3 lg:grid-cols-[22rem_1fr]">
        <form
          className="card space-y-3 p-3"
          aria-label="Plan inputs"
          onSubmit={(e) => {
            e.preventDefault();
            if (request) planIt.mutate(request);
          }}
        >
          <fieldset>
            <legend className="field-label">A click on the map places</legend>
            <div className="grid grid-cols-2 gap-2">
              {(['base', 'target'] as const).map((k) => (
                <button key={k} type="button" aria-pressed={placing === k} onClick={() => setPlacing(k)}
                  className={`min-h-12 rounded-lg border-2 font-semibold ${placing === k ? 'border-ink-900 bg-ink-900 text-chalk' : 'border-ink-200 bg-white'}`}>
                  {k === 'base' ? 'Base' : 'Target'}
                </button>
              ))}
            </div>
          </fieldset>
          <CoordFields id="base" label="Base" value={form.base} onChange={(v) => setForm((f) => ({ ...f, base: v }))} />
          <CoordFields id="target" label="Target" value={form.target} onChange={(v) => setForm((f) => ({ ...f, target: v }))} />
          <div>
            <label className="field-label" htmlFor="plan-drone">Drone</label>
            <select id="plan-drone" className={field} value={form.droneProfileId} onChange={(e) => setForm((f) => ({ ...f, droneProfileId: e.target.value }))}>
              {(drones.data ?? []).filter((d) => d.active || d.id === form.droneProfileId).map((d) => <option key={d.id} value={d.id}>{d.name}</option>)}
            </select>
          </div>
          <div>
            <label className="field-label" htmlFor="plan-harvester">Harvester</label>
            <select id="plan-harvester" className={field} value={form.harvesterProfileId} onChange={(e) => setForm((f) => ({ ...f, harvesterProfileId: e.target.value }))}>
              {(harvesters.data ?? []).filter((h) => h.active || h.id === form.harvesterProfileId).map((h) => <option key={h.id} value={h.id}>{h.name}</option>)}
            </select>
          </div>
          <div>
            <label className="field-label" htmlFor="plan-depart">Departure (your time, UTC{formatOffset(browserOffsetMinutes(form.departLocal))})</label>
            <input id="plan-depart" type="datetime-local" className={field} value={form.departLocal} onChange={(e) => setForm((f) => ({ ...f, departLocal: e.target.value }))} />
          </div>
          <div className="grid grid-cols-2 gap-2">
            <div>
              <label className="field-label" htmlFor="plan-wind">Wind ({unitLabel('speed', system)})</label>
              <input id="plan-wind" className={field} inputMode="decimal" value={form.windSpeed} onChange={(e) => setForm((f) => ({ ...f, windSpeed: e.target.value }))} />
            </div>
            <div>
              <label className="field-label" htmlFor="plan-wind-from">Blowing from (°)</label>
              <input id="plan-wind-from" className={field} inputMode="numeric" value={form.windFrom} onChange={(e) => setForm((f) => ({ ...f, windFrom: e.target.value }))} />
            </div>
          </div>
          <label className="flex min-h-12 items-center gap-2">
            <input type="checkbox" className="h-5 w-5" checked={form.returnToBase} onChange={(e) => setForm((f) => ({ ...f, returnToBase: e.target.checked }))} />
            <span className="font-semibold">Return to base</span>
          </label>
          <div>
            <label className="field-label" htmlFor="plan-objective">Objective</label>
            <select id="plan-objective" className={field} value={form.objective} onChange={(e) => setForm((f) => ({ ...f, objective: e.target.value as MissionObjective }))}>
              <option value="time">Least total time (flight and charging)</option>
              <option value="fewest-perches">Fewest perches</option>
            </select>
          </div>
          {!request && <p className="text-sm text-ink-700">Place the base and the target (on the map or typed), and pick a departure.</p>}
          {planError && (
            <p className="field-error" role="alert">
              {planError.message}
              {planError.issues.map((i) => <span key={i.path} className="block">{i.message}</span>)}
            </p>
          )}
          {!planError && errorOf(planIt.error) && <p className="field-error" role="alert">{errorOf(planIt.error)}</p>}
          <button type="submit" className="btn-primary min-h-12 w-full" disabled={!request || planIt.isPending}>
            {planIt.isPending ? 'Planning…' : 'Plan the route'}
          </button>
        </form>
        <div className="space-y-3">
          <PlanMap base={form.base} target={form.target} stops={stops} placing={placing} onPlace={onPlace} system={system} />
          {plan && !plan.feasible && (
            <section className="rounded-lg border-2 border-alarm bg-red-50 p-3" role="alert" aria-label="No route">
              <h2 className="font-bold text-alarm">No route for these inputs</h2>
              {infeasibleText(plan, system).map((t) => <p key={t}>{t}</p>)}
            </section>
          )}
          {plan?.feasible && (
            <section className="card space-y-3" aria-label="The plan">
              <PlanSummary plan={plan} offset={offset} system={system} />
              <ChargeChart plan={plan} reservePercent={drone?.reservePercent} />
              <LegsTable plan={plan} system={system} />
              <PerchTable plan={plan} lines={lines.data ?? []} offset={offset} system={system} />
              {canPlan && request && (
                <MovePerchPoint
                  plan={plan}
                  system={system}
                  onMove={(spanId, alongM) => {
                    const perchPoints = [...form.perchPoints.filter((pp) => pp.spanId !== spanId), ...(alongM === null ? [] : [{ spanId, alongM }])];
                    setForm((f) => ({ ...f, perchPoints }));
                    const { perchPoints: _old, ...rest } = request;
                    planIt.mutate(perchPoints.length ? { ...rest, perchPoints } : rest);
                  }}
                />
              )}
              <p className="text-xs text-ink-700">Times in UTC{offset}, the departure's own offset.</p>
              <Caution mission compact />
            </section>
          )}
          {plan?.feasible && canPlan && request && (
            <section className="card flex flex-wrap items-end gap-2" aria-label="Save">
              <div className="min-w-60 flex-1">
                <label className="field-label" htmlFor="mission-name">Mission name</label>
                <input id="mission-name" className={field} value={name} onChange={(e) => setName(e.target.value)} />
              </div>
              {id ? (
                <button type="button" className="btn-primary min-h-12" disabled={replan.isPending} onClick={() => replan.mutate(request)}>Replan this mission</button>
              ) : (
                <button type="button" className="btn-primary min-h-12" disabled={!name.trim() || save.isPending} onClick={() => save.mutate(request)}>Save as a mission</button>
              )}
              {errorOf(save.error ?? replan.error) && <p className="field-error w-full" role="alert">{errorOf(save.error ?? replan.error)}</p>}
            </section>
          )}
        </div>
      </div>
      {/* What was flown against this plan (the load-evidence feature, composed in src/app/router.tsx). */}
      {mission.data && flownSlot?.(mission.data)}
    </div>
  );
}

export const Component = PlanPage;
