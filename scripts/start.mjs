// `npm start`: builds the client when the build is missing or older than its sources, then runs the server.
import { spawnSync, spawn } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';

function newestMtime(dir) {
  let newest = 0;
  for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
    const p = path.join(dir, entry.name);
    newest = Math.max(newest, entry.isDirectory() ? newestMtime(p) : fs.statSync(p).mtimeMs);
  }
  return newest;
}

const built = path.resolve('dist/index.html');
const sources = ['src', 'shared', 'public'].filter((d) => fs.existsSync(d)).map(newestMtime);
const stale = !fs.existsSync(built) || fs.statSync(built).mtimeMs < Math.max(...sources, fs.statSync('index.html').mtimeMs);
if (stale) {
  console.log('Building the client…');
  const r = spawnSync(process.execPath, ['node_modules/vite/bin/vite.js', 'build'], { stdio: 'inherit' });
  if (r.status !== 0) process.exit(r.status ?? 1);
}
const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], { stdio: 'inherit' });
for (const sig of ['SIGINT', 'SIGTERM']) process.on(sig, () => child.kill(sig));
child.on('exit', (code) => process.exit(code ?? 0));
