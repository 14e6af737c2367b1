import { execFile } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { promisify } from 'node:util';
import { afterAll, describe, expect, it } from 'vitest';
import sharp from 'sharp';
import { newDataDir, query, signIn, startServer, type ChildServer } from './child-server.ts';

// `npm run backup` / `npm run restore` as a user runs them, against a real server process that keeps writing.
// The integrity check is SQLite's own `PRAGMA integrity_check` (sqlite.org/pragma.html#pragma_integrity_check).
const run = promisify(execFile);
const dirs: string[] = [];
const running: ChildServer[] = [];
afterAll(() => {
  for (const s of running) if (s.proc.exitCode === null) s.proc.kill('SIGKILL');
  for (const d of dirs) fs.rmSync(d, { recursive: true, force: true });
});

const envFor = (dir: string) => ({ ...process.env, DATABASE_PATH: path.join(dir, 'roostline.sqlite'), UPLOADS_DIR: path.join(dir, 'uploads') });
const script = (name: string, args: string[], dir: string) => run(process.execPath, ['--import', 'tsx', `scripts/${name}.ts`, ...args], { env: envFor(dir) });

async function upload(s: ChildServer, headers: Record<string, string>, jpeg: Buffer) {
  const form = new FormData();
  form.append('photo', new Blob([new Uint8Array(jpeg)], { type: 'image/jpeg' }), 'p.jpg');
  const res = await fetch(`${s.baseUrl}/api/photos`, { method: 'POST', headers, body: form });
  if (res.status !== 201) throw new Error(`upload: ${res.status}`);
  return (await res.json()).id as string;
}

describe('backup and restore', () => {
  it('when a backup is taken while crews write, then it verifies, passes integrity_check, holds every record committed before it began, and a restore brings the photos back byte for byte', async () => {
    const dir = newDataDir();
    const restored = newDataDir();
    const out = path.join(newDataDir(), 'backup-1');
    dirs.push(dir, restored, path.dirname(out));
    const s = await startServer(dir);
    running.push(s);
    const headers = await signIn(s.baseUrl, 'surveyor');
    const jpegs = await Promise.all([10, 80, 160].map((g) => sharp({ create: { width: 640, height: 480, channels: 3, background: { r: 20, g, b: 200 } } }).jpeg().toBuffer()));
    const before = [await upload(s, headers, jpegs[0]), await upload(s, headers, jpegs[1])];
    const originals = new Map<string, Buffer>();
    for (const id of before) originals.set(id, Buffer.from(await (await fetch(`${s.baseUrl}/api/photos/${id}/original`, { headers })).arrayBuffer()));

    // Writers keep going during the backup.
    let writing = true;
    let during = 0;
    const writer = (async () => {
      while (writing) {
        await upload(s, headers, jpegs[2]);
        during++;
      }
    })();
    await new Promise((r) => setTimeout(r, 200));
    const { stdout } = await script('backup', ['--out', out], dir);
    writing = false;
    await writer;
    expect(stdout).toMatch(/Backed up/);
    expect(during).toBeGreaterThan(0);

    const verify = await script('backup', ['--verify', out], dir);
    expect(verify.stdout).toMatch(/verifies/);
    const copy = path.join(out, 'roostline.sqlite');
    expect((await query<{ integrity_check: string }>(copy, 'PRAGMA integrity_check'))[0].integrity_check).toBe('ok');
    const inCopy = new Set((await query<{ id: string }>(copy, 'select id from photos')).map((r) => r.id));
    for (const id of before) expect(inCopy.has(id), `photo ${id} committed before the backup`).toBe(true);
    const [{ n: users }] = await query<{ n: number }>(copy, 'select count(*) as n from users');
    expect(users).toBeGreaterThanOrEqual(4);

    // Restoring onto a running server's database is refused; so is replacing a database without --force.
    await expect(script('restore', ['--from', out, '--force'], dir)).rejects.toMatchObject({ stderr: expect.stringMatching(/is running/) });
    s.proc.kill('SIGTERM');
    expect(await s.exited).toBe(0);
    fs.writeFileSync(path.join(restored, 'roostline.sqlite'), 'an older database');
    await expect(script('restore', ['--from', out], restored)).rejects.toMatchObject({ stderr: expect.stringMatching(/--force/) });
    const ok = await script('restore', ['--from', out, '--force'], restored);
    expect(ok.stdout).toMatch(/Restored/);
    expect(fs.readdirSync(restored).some((n) => n.startsWith('roostline.sqlite.before-restore-'))).toBe(true);

    const r = await startServer(restored);
    running.push(r);
    const h2 = await signIn(r.baseUrl, 'planner');
    for (const id of before) {
      const res = await fetch(`${r.baseUrl}/api/photos/${id}/original`, { headers: h2 });
      expect(res.status).toBe(200);
      expect(Buffer.from(await res.arrayBuffer()).equals(originals.get(id)!)).toBe(true);
      expect((await fetch(`${r.baseUrl}/api/photos/${id}/thumbnail`, { headers: h2 })).status).toBe(200);
    }
    r.proc.kill('SIGTERM');
    expect(await r.exited).toBe(0);
  }, 180_000);
});
