// Progress of a background rescore job, polled until it ends.
import { useQuery } from '@tanstack/react-query';
import { profileQueries } from './queries.ts';
import { count } from '../../lib/format.ts';

export function JobProgress({ jobId }: { jobId: string | null }) {
  const job = useQuery(profileQueries.job(jobId));
  if (!jobId) return null;
  const j = job.data;
  const pct = j && j.total > 0 ? Math.round((100 * j.done) / j.total) : j?.state === 'done' ? 100 : 0;
  const label =
    !j ? 'Starting the rescore…'
    : j.state === 'queued' ? 'Rescore queued behind another job…'
    : j.state === 'running' ? `Rescoring spans: ${count(j.done)} of ${count(j.total)}`
    : j.state === 'done' ? `Rescored ${count(j.total)} span${j.total === 1 ? '' : 's'}.`
    : `Rescore failed: ${j.error ?? 'unknown error'}`;
  return (
    <div className="space-y-1" data-testid="job-progress">
      <div
        role="progressbar"
        aria-label="Rescore progress"
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={pct}
        className="h-3 w-full overflow-hidden rounded-full bg-ink-100"
      >
        <div className={`h-full ${j?.state === 'failed' ? 'bg-alarm' : 'bg-ink-700'} transition-all`} style={{ width: `${pct}%` }} />
      </div>
      <p className={`text-sm ${j?.state === 'failed' ? 'text-alarm' : 'text-ink-700'}`} aria-live="polite">{label}</p>
    </div>
  );
}
