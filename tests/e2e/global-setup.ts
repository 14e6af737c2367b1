import { spawnSync } from 'node:child_process';

// The journeys run against the built client, exactly what `npm start` serves.
export default function setup() {
  // NODE_ENV from the test runner ("test") would make Vite build React's development bundle: build for production.
  const r = spawnSync(process.execPath, ['node_modules/vite/bin/vite.js', 'build', '--logLevel', 'warn'], { stdio: 'inherit', env: { ...process.env, NODE_ENV: 'production' } });
  if (r.status !== 0) throw new Error('client build failed');
}
