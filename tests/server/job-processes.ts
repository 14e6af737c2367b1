// Helpers for the tests that run import jobs on real server processes (child-server.ts) and kill them mid-way.
import { expect } from 'vitest';
import type { ChildServer } from './child-server.ts';

/** A CSV of `rows` new spans on a line of its own (a chain of poles ~45 m apart inside the invented demo region). */
export function chainCsv(lineName: string, rows: number, lat = -30.4): string {
  const header = 'line_name,line_owner,voltage_kv,frequency_hz,phases,load_typical_a,load_min_a,load_peak_a,from_label,from_lat,from_lon,from_kind,from_attachment_height_m,to_label,to_lat,to_lon,to_kind,to_attachment_height_m,conductor_code_word,clearance_m,terrain,survey_date';
  const out = [header];
  const tag = lineName.replace(/\W+/g, '').slice(-8).toUpperCase();
  for (let i = 0; i < rows; i++) {
    const lon = -130.8 + i * 0.0005;
    out.push([lineName, 'Harrow Vale Power Cooperative', '12.47', '60', '3', '180', '60', '260', `${tag}-${i}`, lat, lon, 'pole', '11', `${tag}-${i + 1}`, lat, lon + 0.0005, 'pole', '11', 'Penguin', '7.9', 'open-field', '2026-10-02'].join(','));
  }
  return out.join('\n') + '\n';
}

export interface JobAnswer {
  job: { id: string; state: string; done: number; total: number; error: string | null };
  report: { summary: Record<string, number> } | null;
}

/** Queues an import job on a server (text/csv body); answers the job id. */
export async function postImportJob(s: ChildServer, headers: Record<string, string>, mode: 'dry-run' | 'commit', csv: string): Promise<string> {
  const res = await fetch(`${s.baseUrl}/api/import/jobs?mode=${mode}`, { method: 'POST', headers: { ...headers, 'Content-Type': 'text/csv' }, body: csv });
  expect(res.status, await res.clone().text()).toBe(202);
  return (await res.json()).job.id;
}

export async function readImportJob(s: ChildServer, headers: Record<string, string>, id: string): Promise<JobAnswer> {
  const res = await fetch(`${s.baseUrl}/api/import/jobs/${id}`, { headers });
  expect(res.status).toBe(200);
  return res.json();
}

/** Polls a job through a server until `ok`; answers the last reading. */
export async function waitJob(s: ChildServer, headers: Record<string, string>, id: string, ok: (a: JobAnswer) => boolean, timeoutMs = 180_000, pollMs = 100): Promise<JobAnswer> {
  const start = Date.now();
  for (;;) {
    const a = await readImportJob(s, headers, id);
    if (ok(a)) return a;
    if (a.job.state === 'failed') throw new Error(`job failed: ${a.job.error}`);
    if (a.job.state === 'done') throw new Error(`job finished (${a.job.done}/${a.job.total}) before the awaited moment`);
    if (Date.now() - start > timeoutMs) throw new Error(`job still ${a.job.state} (${a.job.done}/${a.job.total}) after ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, pollMs));
  }
}

export async function spansOnLine(s: ChildServer, headers: Record<string, string>, lineName: string): Promise<number> {
  const lines = await (await fetch(`${s.baseUrl}/api/lines`, { headers })).json();
  const line = lines.items.find((l: { name: string }) => l.name === lineName);
  if (!line) return 0;
  return (await (await fetch(`${s.baseUrl}/api/spans?lineId=${line.id}&pageSize=1`, { headers })).json()).total;
}
