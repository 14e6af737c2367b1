// A saved mission's record: stale badge with its reasons, authorisation (safety, not the mission's own planner;
// the server enforces both), exports, the brief and the history.
import { Link } from 'react-router';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { ApiError } from '../../lib/api.ts';
import { useMe } from '../auth/queries.ts';
import { missionApi } from './api.ts';
import { missionQueries } from './queries.ts';
import { dateTime } from '../../lib/format.ts';
import { staleReasonText } from './transforms.ts';
import type { Mission } from './types.ts';


const ACTION_WORDS: Record<string, string> = {
  create: 'Saved', 'mission.create': 'Saved', replan: 'Replanned', 'mission.replan': 'Replanned', authorise: 'Authorised', 'mission.authorise': 'Authorised',
  stale: 'Marked for a new plan', 'mission.stale': 'Marked for a new plan', 'mission.needs-new-plan': 'Marked for a new plan',
  'mission.needs-new-plan.authorisation-withdrawn': 'Marked for a new plan; its authorisation withdrawn', update: 'Changed', 'mission.update': 'Changed',
};

export function StaleBadge({ mission }: { mission: Mission }) {
  if (mission.stale) return <span className="rounded-full bg-alarm px-3 py-1 text-sm font-bold text-white" data-testid="stale-badge">⚠ Needs a new plan</span>;
  if (mission.authorisedAt) return <span className="rounded-full bg-go px-3 py-1 text-sm font-bold text-white">✓ Authorised</span>;
  return <span className="rounded-full bg-brass-300 px-3 py-1 text-sm font-bold text-ink-900">○ Awaiting authorisation</span>;
}

export function MissionPanel({ mission }: { mission: Mission }) {
  const me = useMe();
  const qc = useQueryClient();
  const history = useQuery(missionQueries.history(mission.id));
  const ownPlan = mission.plannerId === me.id;
  const mayAuthorise = me.roles.includes('safety') && !ownPlan && !mission.authorisedAt;
  const authorise = useMutation({
    mutationFn: () => missionApi.authorise(mission.id, mission.version),
    onSuccess: (m) => {
      qc.setQueryData(missionQueries.detail(mission.id).queryKey, m);
      void qc.invalidateQueries({ queryKey: missionQueries.all() });
    },
  });
  const err = authorise.error instanceof ApiError ? authorise.error.message : authorise.error ? 'The server could not be reached' : null;
  return (
    <section className="card space-y-3" aria-label="Mission record">
      <div className="flex flex-wrap items-center gap-3">
        <StaleBadge mission={mission} />
        <span className="text-sm text-ink-700">
          Planned by {mission.plannerName ?? (ownPlan ? 'you' : 'a planner')}
          {mission.authorisedAt ? ` · authorised ${dateTime(mission.authorisedAt)}${mission.authorisedByName ? ` by ${mission.authorisedByName}` : ''}` : ''}
        </span>
        <span className="ml-auto flex flex-wrap gap-2">
          <Link className="btn-ghost" to={`/missions/${mission.id}/brief`}>Mission brief</Link>
          {(['gpx', 'geojson', 'kml'] as const).map((f) => (
            <a key={f} className="btn-ghost" href={missionApi.exportUrl(mission.id, f)} download>
              Export {f === 'gpx' ? 'GPX' : f === 'geojson' ? 'GeoJSON' : 'KML'}
            </a>
          ))}
          {mayAuthorise && (
            <button type="button" className="btn-primary" disabled={authorise.isPending || mission.stale} onClick={() => authorise.mutate()}>
              Authorise
            </button>
          )}
        </span>
      </div>
      {mission.stale && (
        <div className="rounded-lg border-2 border-alarm bg-red-50 p-3" data-testid="stale-reasons">
          <p className="font-bold text-alarm">This plan no longer holds; replan before authorising.</p>
          <ul className="list-disc pl-5">
            {(mission.staleReasons ?? []).map((r, i) => <li key={i}>{staleReasonText(r)}</li>)}
          </ul>
        </div>
      )}
      {err && <p className="field-error" role="alert">{err}</p>}
      {(history.data ?? []).length > 0 && (
        <details>
          <summary className="cursor-pointer font-semibold">History ({history.data!.length})</summary>
          <ol className="mt-2 space-y-1 text-sm">
            {history.data!.map((h) => (
              <li key={h.id}>{dateTime(h.at)} — {ACTION_WORDS[h.action] ?? 'Changed'}{h.actorName ? ` by ${h.actorName}` : ''}</li>
            ))}
          </ol>
        </details>
      )}
    </section>
  );
}
