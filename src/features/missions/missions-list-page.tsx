// Every saved mission, newest first, with its state; planners start a new plan here.
import { Link } from 'react-router';
import { useQuery } from '@tanstack/react-query';
import { Caution } from '../../components/caution.tsx';
import { useMe } from '../auth/queries.ts';
import { StaleBadge } from './mission-panel.tsx';
import { missionQueries } from './queries.ts';
import { dateTime } from '../../lib/format.ts';
import { formatDistance, formatDuration } from './transforms.ts';

export function MissionsListPage() {
  const me = useMe();
  const q = useQuery(missionQueries.list());
  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center gap-3">
        <h1 className="page-title">Missions</h1>
        {me.roles.includes('planner') && <Link className="btn-primary ml-auto" to="/missions/new">Plan a mission</Link>}
      </div>
      <Caution mission compact />
      {q.isPending && <p>Loading…</p>}
      {q.error && <p className="field-error" role="alert">{q.error.message}</p>}
      {q.data && q.data.length === 0 && <p className="text-ink-700">No mission saved yet.</p>}
      <ul className="space-y-2">
        {(q.data ?? []).map((m) => (
          <li key={m.id} className="card flex flex-wrap items-center gap-3 p-3">
            <Link className="text-lg font-semibold underline" to={`/missions/${m.id}`}>{m.name}</Link>
            <StaleBadge mission={m} />
            {m.plan?.feasible && (
              <span className="text-sm text-ink-700">
                {formatDistance(m.plan.totalDistanceM, me.unitSystem)} · {formatDuration(m.plan.totalDurationS)} · {m.plan.perches.length} perch{m.plan.perches.length === 1 ? '' : 'es'}
              </span>
            )}
            {m.updatedAt && <span className="ml-auto text-sm text-ink-700">{dateTime(m.updatedAt)}</span>}
          </li>
        ))}
      </ul>
    </div>
  );
}
