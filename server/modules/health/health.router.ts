import { featureRouter } from '../../http/access.ts';

export function healthRouter() {
  const r = featureRouter('/api/health');
  // Answers only once the app exists, and the app is created after migrations have run.
  r.get('/', 'public', (_req, res) => {
    res.json({ status: 'ok' });
  });
  return r.router;
}
