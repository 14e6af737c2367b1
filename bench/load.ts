// `npm run bench -- --load`: 50 concurrent clients for 60 s against a real server on loopback (a fresh demo database
// in a temp folder), a mix of span list, span detail, span tiles, span edits, photo uploads and sign-ins. Prints
// p50/p95 per route, the 5xx count and the lost writes: at the end the server is stopped (SIGTERM) and every
// acknowledged edit and photo is looked up in the database file. The sign-in limit counts failed attempts only, and
// the bench never fails one; it still sets SIGN_IN_BURST high so a slow start cannot trip it.
// LOAD_CLIENTS and LOAD_SECONDS change the size of the run.
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import sharp from 'sharp';
import sqlite3 from 'sqlite3';
import type { BenchRow } from './run.ts';
import { freePort } from '../scripts/free-port.ts';

const CLIENTS = Number(process.env.LOAD_CLIENTS ?? 50);
const SECONDS = Number(process.env.LOAD_SECONDS ?? 60);
const MIX: [string, number][] = [
  ['list', 30],
  ['detail', 25],
  ['tile', 20],
  ['edit', 15],
  ['photo', 5],
  ['sign-in', 5],
];


function pick(r: number): string {
  const total = MIX.reduce((s, [, w]) => s + w, 0);
  let x = r * total;
  for (const [name, w] of MIX) if ((x -= w) < 0) return name;
  return MIX[0][0];
}

const pct = (xs: number[], p: number) => {
  if (!xs.length) return 0;
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor((p / 100) * s.length))];
};

function all<T>(file: string, sql: string, params: unknown[] = []): Promise<T[]> {
  const db = new sqlite3.Database(file, sqlite3.OPEN_READONLY);
  return new Promise<T[]>((resolve, reject) => db.all(sql, params, (err, rows) => (err ? reject(err) : resolve(rows as T[])))).finally(() => db.close());
}

export async function run(): Promise<BenchRow[]> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'roostline-load-'));
  const port = await freePort();
  const base = `http://127.0.0.1:${port}`;
  const dbFile = path.join(dir, 'roostline.sqlite');
  const server = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    env: { ...process.env, PORT: String(port), DATABASE_PATH: dbFile, UPLOADS_DIR: path.join(dir, 'uploads'), SEED_DEMO: 'true', SIGN_IN_BURST: '100000' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let log = '';
  server.stdout!.on('data', (d) => (log += d));
  server.stderr!.on('data', (d) => (log += d));
  const exited = new Promise<number | null>((r) => server.once('exit', (c) => r(c)));
  try {
    const ready = Date.now() + 120_000;
    for (;;) {
      if (server.exitCode !== null) throw new Error(`server exited:\n${log}`);
      if (await fetch(`${base}/api/health`).then((r) => r.ok, () => false)) break;
      if (Date.now() > ready) throw new Error(`server not ready:\n${log}`);
      await new Promise((r) => setTimeout(r, 250));
    }

    const signIn = async () => {
      const res = await fetch(`${base}/api/auth/sign-in`, { method: 'POST', headers: { 'Content-Type': 'application/json', Origin: base }, body: JSON.stringify({ email: 'surveyor@roostline.test', password: 'roostline-demo' }) });
      await res.arrayBuffer();
      return { status: res.status, headers: { Cookie: res.headers.getSetCookie().map((c) => c.split(';')[0]).join('; '), Origin: base } };
    };
    const first = await signIn();
    const list = (await (await fetch(`${base}/api/spans?page=1&pageSize=200`, { headers: first.headers })).json()) as { items: { id: string; status: string }[] };
    const spanIds = list.items.map((s) => s.id);
    const editable = list.items.filter((s) => ['draft', 'returned', 'approved'].includes(s.status)).map((s) => s.id);
    // Tiles are asked for around the demo structures (web-mercator tile of a structure's position).
    const structures = (await (await fetch(`${base}/api/structures`, { headers: first.headers })).json()) as { items: { lat: number; lon: number }[] };
    const places = structures.items.length ? structures.items : [{ lat: 0, lon: 0 }];
    const jpeg = await sharp({ create: { width: 1600, height: 1200, channels: 3, background: { r: 40, g: 110, b: 70 } } }).jpeg({ quality: 85 }).toBuffer();

    const times = new Map<string, number[]>();
    const statuses = new Map<string, Map<number, number>>();
    let errors5xx = 0;
    let failedNetwork = 0;
    const lastEdit = new Map<string, string>();
    let ackedEdits = 0;
    const ackedPhotos: string[] = [];
    const record = (route: string, ms: number, status: number) => {
      (times.get(route) ?? times.set(route, []).get(route)!).push(ms);
      const m = statuses.get(route) ?? statuses.set(route, new Map()).get(route)!;
      m.set(status, (m.get(status) ?? 0) + 1);
      if (status >= 500) errors5xx++;
    };
    const timed = async (route: string, f: () => Promise<Response>) => {
      const t0 = performance.now();
      try {
        const res = await f();
        const body = await res.arrayBuffer();
        record(route, performance.now() - t0, res.status);
        return { res, body };
      } catch {
        failedNetwork++;
        return null;
      }
    };

    const end = Date.now() + SECONDS * 1000;
    const client = async (c: number) => {
      let session = (await signIn()).headers;
      // Each client edits only its own spans, so the last acknowledged edit of each span is the one to find.
      const mine = editable.filter((_id, i) => i % CLIENTS === c);
      let n = 0;
      let seed = c * 7919 + 1;
      const rnd = () => ((seed = (seed * 48271) % 2147483647) / 2147483647);
      while (Date.now() < end) {
        const op = pick(rnd());
        n++;
        if (op === 'list') await timed('GET /api/spans', () => fetch(`${base}/api/spans?page=${1 + Math.floor(rnd() * 3)}&pageSize=50`, { headers: session }));
        else if (op === 'detail') await timed('GET /api/spans/:id', () => fetch(`${base}/api/spans/${spanIds[Math.floor(rnd() * spanIds.length)]}`, { headers: session }));
        else if (op === 'tile') {
          const z = 12 + Math.floor(rnd() * 3);
          const p = places[Math.floor(rnd() * places.length)];
          const x = Math.floor(((p.lon + 180) / 360) * 2 ** z);
          const lat = (p.lat * Math.PI) / 180;
          const y = Math.floor(((1 - Math.log(Math.tan(lat) + 1 / Math.cos(lat)) / Math.PI) / 2) * 2 ** z);
          await timed('GET /api/tiles/spans/:z/:x/:y.mvt', () => fetch(`${base}/api/tiles/spans/${z}/${x}/${y}.mvt`, { headers: session }));
        } else if (op === 'edit' && mine.length) {
          const id = mine[Math.floor(rnd() * mine.length)];
          const got = await timed('GET /api/spans/:id', () => fetch(`${base}/api/spans/${id}`, { headers: session }));
          if (!got || got.res.status !== 200) continue;
          const version = JSON.parse(Buffer.from(got.body).toString()).version;
          const value = `B c${c} n${n}`;
          const r = await timed('PATCH /api/spans/:id', () => fetch(`${base}/api/spans/${id}`, { method: 'PATCH', headers: { ...session, 'Content-Type': 'application/json' }, body: JSON.stringify({ version, phasePosition: value }) }));
          if (r?.res.status === 200) {
            lastEdit.set(id, value);
            ackedEdits++;
          }
        } else if (op === 'photo') {
          const form = new FormData();
          form.append('photo', new Blob([new Uint8Array(jpeg)], { type: 'image/jpeg' }), 'load.jpg');
          const r = await timed('POST /api/photos', () => fetch(`${base}/api/photos`, { method: 'POST', headers: session, body: form }));
          if (r?.res.status === 201) ackedPhotos.push(JSON.parse(Buffer.from(r.body).toString()).id);
        } else if (op === 'sign-in') {
          const t0 = performance.now();
          const s = await signIn().catch(() => null);
          if (!s) failedNetwork++;
          else {
            record('POST /api/auth/sign-in', performance.now() - t0, s.status);
            if (s.status === 200) session = s.headers;
          }
        }
      }
    };
    const started = performance.now();
    await Promise.all(Array.from({ length: CLIENTS }, (_x, c) => client(c)));
    const elapsed = (performance.now() - started) / 1000;

    server.kill('SIGTERM');
    const code = await exited;
    // Lost writes: every acknowledged edit's value is its span's saved value, every acknowledged photo has its row.
    let lost = 0;
    for (const [id, value] of lastEdit) {
      const [row] = await all<{ phase_position: string }>(dbFile, 'select phase_position from spans where id = ?', [id]);
      if (row?.phase_position !== value) lost++;
    }
    const ids = new Set((await all<{ id: string }>(dbFile, 'select id from photos')).map((r) => r.id));
    const lostPhotos = ackedPhotos.filter((id) => !ids.has(id)).length;
    const integrity = (await all<{ integrity_check: string }>(dbFile, 'PRAGMA integrity_check')).map((r) => r.integrity_check).join(' ');

    const rows: BenchRow[] = [...times.entries()].map(([route, xs]) => ({
      route,
      requests: xs.length,
      'p50 ms': Math.round(pct(xs, 50)),
      'p95 ms': Math.round(pct(xs, 95)),
      statuses: [...(statuses.get(route) ?? new Map()).entries()].map(([s, k]) => `${s}×${k}`).join(' '),
    }));
    const totalReq = [...times.values()].reduce((s, xs) => s + xs.length, 0);
    console.log(
      `  ${CLIENTS} clients for ${elapsed.toFixed(0)} s: ${totalReq} requests (${(totalReq / elapsed).toFixed(0)}/s), 5xx ${errors5xx}, network failures ${failedNetwork}, ` +
        `acknowledged edits ${ackedEdits} (lost ${lost} of ${lastEdit.size} spans checked), photos ${ackedPhotos.length} (lost ${lostPhotos}), ` +
        `server exit ${code}, integrity ${integrity}`,
    );
    return rows;
  } finally {
    if (server.exitCode === null) server.kill('SIGKILL');
    fs.rmSync(dir, { recursive: true, force: true });
  }
}
