// A durable job on the SQLite file survives its process: the server is killed (SIGKILL) in the middle of an import
// commit and started again on the same data; the restarted server takes the job over once its lease has run out
// and finishes it, with every span stored once.
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { newDataDir, query, signIn, startServer, type ChildServer } from './child-server.ts';
import { chainCsv, postImportJob, spansOnLine, waitJob } from './job-processes.ts';

const dirs: string[] = [];
const running: ChildServer[] = [];
afterAll(() => {
  for (const s of running) if (s.proc.exitCode === null) s.proc.kill('SIGKILL');
  for (const d of dirs) fs.rmSync(d, { recursive: true, force: true });
});
const ENV = { JOB_LEASE_MS: '3000', JOB_POLL_MS: '200' };

describe('durable jobs across a restart (SQLite)', () => {
  it('when the server dies mid-way through an import commit, then after a restart the job finishes and every span is stored once', async () => {
    const dir = newDataDir();
    dirs.push(dir);
    const first = await startServer(dir, ENV);
    running.push(first);
    let headers = await signIn(first.baseUrl, 'surveyor');
    // Enough rows that writing them takes many parts (1 000 rows each) and several progress writes, so the
    // kill lands mid-way on a quiet machine too.
    const ROWS = 8000;
    const lineName = 'Restart import feeder';
    const id = await postImportJob(first, headers, 'commit', chainCsv(lineName, ROWS));
    // Killed once it has written part of the file (rows checked, then rows written: past half the total).
    await waitJob(first, headers, id, (a) => a.job.state === 'running' && a.job.done > ROWS && a.job.done < 2 * ROWS, 180_000, 20);
    first.proc.kill('SIGKILL');
    await first.exited;
    const [mid] = await query<{ state: string; attempts: number }>(path.join(dir, 'roostline.sqlite'), 'select state, attempts from jobs where id = ?', [id]);
    expect(mid).toMatchObject({ state: 'running', attempts: 1 });

    const second = await startServer(dir, ENV);
    running.push(second);
    headers = await signIn(second.baseUrl, 'surveyor');
    const end = await waitJob(second, headers, id, (a) => a.job.state === 'done');
    expect(end.job.done).toBe(end.job.total);
    expect(await spansOnLine(second, headers, lineName)).toBe(ROWS);
    const [row] = await query<{ attempts: number }>(path.join(dir, 'roostline.sqlite'), 'select attempts from jobs where id = ?', [id]);
    expect(row.attempts).toBe(2);
    const [dupes] = await query<{ n: number }>(path.join(dir, 'roostline.sqlite'), "select count(*) - count(distinct s.from_structure_id) as n from spans s join lines l on l.id = s.line_id where l.name = ?", [lineName]);
    expect(dupes.n).toBe(0);
    second.proc.kill('SIGTERM');
    await second.exited;
  }, 400_000);
});
