// Admin: perch-score weights and limits. Each save is a new settings version and rescores every span (with progress).
import { useState } from 'react';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { scoringSettingsSchema, type ScoringSettingsInput, type ScoringSettingsView } from '#shared/schemas/assessment.ts';
import type { UnitSystem } from '#shared/units.ts';
import { Caution } from '../../components/caution.tsx';
import { ApiError } from '../../lib/api.ts';
import { useMe } from '../auth/queries.ts';
import { issuesByField, NumberFields, toSi, useFieldValues, type FieldSpec } from '../calculators/number-fields.tsx';
import { JobProgress } from './job-progress.tsx';
import { dateTime } from '../../lib/format.ts';
import { profileApi, profileQueries } from './queries.ts';

const WEIGHT_FIELDS: FieldSpec[] = [
  { key: 'power-margin', label: 'Power margin', unit: 'weight' },
  { key: 'clearance-margin', label: 'Clearance margin', unit: 'weight' },
  { key: 'hazards', label: 'Hazards', unit: 'weight' },
  { key: 'span-exposure', label: 'Span length & exposure', unit: 'weight' },
  { key: 'data-quality', label: 'Data completeness & age', unit: 'weight' },
];
const LIMIT_FIELDS: FieldSpec[] = [
  { key: 'ampacityMaxConductorC', label: 'Ampacity check at', kind: 'temperature' },
  { key: 'powerMarginFullRatio', label: 'Full power margin at harvest / useful minimum', unit: '×' },
  { key: 'clearanceMarginFullM', label: 'Full clearance margin above the requirement', kind: 'length' },
  { key: 'low', label: 'Penalty per low hazard', unit: '0–1' },
  { key: 'medium', label: 'Penalty per medium hazard', unit: '0–1' },
  { key: 'high', label: 'Penalty per high hazard', unit: '0–1' },
  { key: 'cautionZonePenalty', label: 'Penalty per caution zone', unit: '0–1' },
  { key: 'min', label: 'Ideal span length from', kind: 'length' },
  { key: 'max', label: 'Ideal span length to', kind: 'length' },
  { key: 'spanLengthMaxM', label: 'Span length scoring zero', kind: 'length' },
  { key: 'surveyFreshDays', label: 'Survey fresh for', unit: 'days' },
  { key: 'surveyStaleDays', label: 'Survey stale after', unit: 'days' },
  { key: 'ampacityFlagFactor', label: 'Data-quality factor when the load exceeds ampacity', unit: '0–1' },
  { key: 'batteryEfficiency', label: 'Battery charge efficiency', unit: '0–1' },
];

function flatten(s: ScoringSettingsInput): Record<string, number> {
  return {
    ...s.weights,
    ampacityMaxConductorC: s.ampacityMaxConductorC,
    powerMarginFullRatio: s.powerMarginFullRatio,
    clearanceMarginFullM: s.clearanceMarginFullM,
    ...s.hazardPenalty,
    cautionZonePenalty: s.cautionZonePenalty,
    min: s.spanLengthIdealM.min,
    max: s.spanLengthIdealM.max,
    spanLengthMaxM: s.spanLengthMaxM,
    surveyFreshDays: s.surveyFreshDays,
    surveyStaleDays: s.surveyStaleDays,
    ampacityFlagFactor: s.ampacityFlagFactor,
    batteryEfficiency: s.batteryEfficiency,
  };
}

function nest(v: Record<string, unknown>) {
  return {
    weights: { 'power-margin': v['power-margin'], 'clearance-margin': v['clearance-margin'], hazards: v.hazards, 'span-exposure': v['span-exposure'], 'data-quality': v['data-quality'] },
    ampacityMaxConductorC: v.ampacityMaxConductorC,
    powerMarginFullRatio: v.powerMarginFullRatio,
    clearanceMarginFullM: v.clearanceMarginFullM,
    hazardPenalty: { low: v.low, medium: v.medium, high: v.high },
    cautionZonePenalty: v.cautionZonePenalty,
    spanLengthIdealM: { min: v.min, max: v.max },
    spanLengthMaxM: v.spanLengthMaxM,
    surveyFreshDays: v.surveyFreshDays,
    surveyStaleDays: v.surveyStaleDays,
    ampacityFlagFactor: v.ampacityFlagFactor,
    batteryEfficiency: v.batteryEfficiency,
  };
}

function SettingsForm({ current, system, onJob }: { current: ScoringSettingsView; system: UnitSystem; onJob: (id: string | null) => void }) {
  const qc = useQueryClient();
  const all = [...WEIGHT_FIELDS, ...LIMIT_FIELDS];
  const f = useFieldValues(all, flatten(current.settings), system);
  const body = nest(toSi(all, f.values, system));
  const parsed = scoringSettingsSchema.safeParse(body);
  const save = useMutation({
    mutationFn: () => profileApi.saveSettings(current.version, parsed.success ? parsed.data : (body as never)),
    onSuccess: (res) => {
      onJob(res.rescoreJobId);
      void qc.invalidateQueries({ queryKey: profileQueries.settings().queryKey });
    },
  });
  const issues = save.error instanceof ApiError ? issuesByField(save.error.issues) : parsed.success ? {} : issuesByField(parsed.error.issues);
  const weightSum = WEIGHT_FIELDS.reduce((s, w) => s + (Number(f.values[w.key]) || 0), 0);
  return (
    <form
      className="space-y-4"
      onSubmit={(e) => {
        e.preventDefault();
        if (parsed.success) save.mutate();
      }}
    >
      <section className="card space-y-3">
        <h2 className="text-lg font-bold">Factor weights</h2>
        <p className="text-sm text-ink-700">Each factor's share of the 0–100 score is its weight over the sum of weights (now {weightSum}).</p>
        <NumberFields specs={WEIGHT_FIELDS} values={f.values} onChange={f.set} system={system} issues={issues} idPrefix="weight" />
        {issues.weights && <p className="field-error">{issues.weights}</p>}
      </section>
      <section className="card space-y-3">
        <h2 className="text-lg font-bold">Limits</h2>
        <NumberFields specs={LIMIT_FIELDS} values={f.values} onChange={f.set} system={system} issues={issues} idPrefix="limit" />
        <Caution compact />
      </section>
      {save.error && <p className="field-error">{save.error instanceof ApiError ? save.error.message : 'The server could not be reached'}</p>}
      <div className="flex flex-wrap items-center gap-3">
        <button type="submit" className="btn-primary" disabled={!parsed.success || save.isPending}>
          Save as version {current.version + 1} and rescore every span
        </button>
      </div>
    </form>
  );
}

export function ScoringSettingsPage() {
  const me = useMe();
  const q = useQuery(profileQueries.settings());
  // Kept here: the form re-mounts on the new version while the rescore goes on.
  const [jobId, setJobId] = useState<string | null>(null);
  if (q.isPending) return <p className="p-8 text-center text-ink-700">Loading the settings…</p>;
  if (q.error) throw q.error;
  return (
    <div className="space-y-4">
      <h1 className="page-title">Perch scoring</h1>
      <p className="text-ink-700">
        Version {q.data.version}, saved {dateTime(q.data.createdAt)}. Gates (gripper fit, contact temperature, clearance, no-perch zones, useful harvest) are not weighted: any one failing makes a span not perchable.
      </p>
      {/* Re-mount the form on a new version so it starts from the saved values. */}
      <JobProgress jobId={jobId} />
      <SettingsForm key={q.data.version} current={q.data} system={me.unitSystem} onJob={setJobId} />
    </div>
  );
}
