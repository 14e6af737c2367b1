import type { AppContext } from '../../context.ts';
import { featureRouter } from '../../http/access.ts';
import { AppError } from '../../http/errors.ts';
import { jobRunnerFor } from './job-runner.ts';

export function jobsRouter(ctx: AppContext) {
  const r = featureRouter('/api/jobs');
  const runner = jobRunnerFor(ctx);

  // Recent jobs, newest first (e.g. the rescore a zone change started).
  r.get('/', 'signed-in', (_req, res) => {
    res.json({ items: runner.list().slice(0, 50) });
  });

  r.get('/:id', 'signed-in', (req, res) => {
    const job = runner.get(String(req.params.id));
    if (!job) throw AppError.notFound('Job');
    res.json(job);
  });

  return r.router;
}
