import { spawnSync } from 'node:child_process';

// The journeys run against the built client, exactly what `npm start` serves.
export default function setup() {
  const r = spawnSync(process.execPath, ['node_modules/vite/bin/vite.js', 'build', '--logLevel', 'warn'], { stdio: 'inherit' });
  if (r.status !== 0) throw new Error('client build failed');
}
