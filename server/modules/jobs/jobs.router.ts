import type { AppContext } from '../../context.ts';
import { featureRouter } from '../../http/access.ts';
import { AppError } from '../../http/errors.ts';
import { jobRunnerFor } from './job-runner.ts';

export function jobsRouter(ctx: AppContext) {
  const r = featureRouter('/api/jobs');
  const queue = jobRunnerFor(ctx);

  // Recent jobs of every process, newest first (e.g. the rescore a zone change started).
  r.get('/', 'signed-in', async (_req, res) => {
    res.json({ items: await queue.list(50) });
  });

  r.get('/:id', 'signed-in', async (req, res) => {
    const job = await queue.get(String(req.params.id));
    if (!job) throw AppError.notFound('Job');
    res.json(job);
  });

  return r.router;
}
