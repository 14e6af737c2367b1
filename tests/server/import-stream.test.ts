// The CSV import as a streamed job: same report as the whole-file import, rows held a batch at a time, commits
// written in parts, bad rows named with their row and column, progress from the job.
import { afterEach, describe, expect, it } from 'vitest';
import { Readable } from 'node:stream';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';
import { Line } from '../../server/modules/inventory/line.entity.ts';
import { Span } from '../../server/modules/inventory/span.entity.ts';
import { Structure } from '../../server/modules/inventory/structure.entity.ts';
import { Hazard } from '../../server/modules/inventory/hazard.entity.ts';
import { planImport } from '../../server/modules/import-export/import.service.ts';
import { applyPlanInParts, planCsvStream } from '../../server/modules/import-export/import-stream.ts';
import { User } from '../../server/modules/auth/user.entity.ts';

const apps: TestApp[] = [];
afterEach(async () => {
  for (const a of apps.splice(0)) await a.close();
});
async function app() {
  const t = await makeTestApp({ signInBurst: 1000 });
  apps.push(t);
  return { t, surveyor: await t.as('surveyor') };
}

const HEADER =
  'line_name,line_owner,voltage_kv,frequency_hz,phases,load_typical_a,load_min_a,load_peak_a,from_label,from_lat,from_lon,from_kind,from_attachment_height_m,to_label,to_lat,to_lon,to_kind,to_attachment_height_m,conductor_code_word,clearance_m,lowest_clearance_m,terrain,survey_date,hazards';
const lineCells = (name: string, kv = '12.47') => [name, 'Harrow Vale Power Cooperative', kv, '60', '3', '180', '60', '260'];
const spanCells = (from: string, fromLon: number, to: string, toLon: number, clearance = '7.9', hazards = '') => [
  from, '-30.1', String(fromLon), 'pole', '11', to, '-30.1', String(toLon), 'pole', '11', 'Penguin', clearance, '7.5', 'open-field', '2026-10-02', hazards,
];
const quote = (c: string) => (/[",\n]/.test(c) ? `"${c.replace(/"/g, '""')}"` : c);
const csv = (rows: string[][]) => [HEADER, ...rows.map((r) => r.map(quote).join(','))].join('\n') + '\n';

/** A file with the cases the planner treats specially: updates, a repeated span, in-file conflicts, bad cells, blank lines. */
function mixedFile() {
  const rows: string[][] = [];
  for (let i = 0; i < 40; i++) rows.push([...lineCells('Stream feeder 1'), ...spanCells(`SF1-${i}`, -130.5 + i * 0.002, `SF1-${i + 1}`, -130.5 + (i + 1) * 0.002, '7.9', i === 3 ? '[{"kindId":"road-crossing","severity":"medium","positionAlongM":30,"note":"Farm road"}]' : '')]);
  rows.push([...lineCells('Stream feeder 1'), ...spanCells('SF1-2', -130.496, 'SF1-3', -130.494)]); // the same span again
  rows.push([...lineCells('Stream feeder 1', '33'), ...spanCells('SF1-50', -130.3, 'SF1-51', -130.298)]); // line field differs from row 1
  rows.push([...lineCells('Stream feeder 2'), ...spanCells('SF2-0', -130.2, 'SF2-1', -130.198, 'high')]); // not a number
  rows.push([...lineCells('Stream feeder 2'), ...spanCells('SF2-1', -130.198, 'SF2-1', -130.198)]); // same structure twice
  rows.push(['', '', '', '', '', '', '', '', '', '', '', '', '', '', '', '', '', '', '', '', '', '', '', '']); // separators only: skipped
  rows.push([...lineCells('Stream feeder 2'), ...spanCells('SF2-1', -130.198, 'SF2-2', -130.196, '7.9', 'not json')]);
  rows.push([...lineCells('Stream feeder 2'), ...spanCells('SF2-2', -130.196, 'SF2-3', -130.194)]);
  return csv(rows) + 'Stream feeder 3,Harrow Vale Power Cooperative,12.47\n'; // too few cells
}

async function waitImport(c: Client, id: string) {
  const seen: { state: string; done: number; total: number }[] = [];
  for (let i = 0; i < 1500; i++) {
    const res = await c.get(`/api/import/jobs/${id}`);
    expect(res.status).toBe(200);
    seen.push({ state: res.body.job.state, done: res.body.job.done, total: res.body.job.total });
    if (res.body.job.state === 'done' || res.body.job.state === 'failed') return { ...res.body, seen };
    await new Promise((r) => setTimeout(r, 20));
  }
  throw new Error('import job did not finish');
}

async function importJob(c: Client, mode: 'dry-run' | 'commit', text: string, filename = 'inventory.csv') {
  const res = await c.upload(`/api/import/jobs?mode=${mode}`).attach('file', Buffer.from(text), { filename, contentType: 'text/csv' });
  expect(res.status).toBe(202);
  return waitImport(c, res.body.job.id);
}

async function inventoryOf(t: TestApp) {
  const em = t.orm.em.fork();
  const lines = await em.find(Line, {}, { orderBy: { name: 'asc' } });
  const structures = await em.find(Structure, {}, { orderBy: { label: 'asc' } });
  const spans = await em.find(Span, {});
  const label = new Map(structures.map((s) => [s.id, s.label]));
  return {
    lines: lines.map((l) => [l.name, l.voltageKv, l.loadPeakA]),
    structures: structures.map((s) => [s.label, s.lat, s.lon, s.kind]),
    spans: spans.map((s) => [label.get(s.fromStructureId), label.get(s.toStructureId), s.status, s.clearanceM, s.conductorCodeWord, s.lengthM.toFixed(3)]).sort(),
    hazards: (await em.count(Hazard, {})),
  };
}

describe('streamed CSV import', () => {
  it('when a file is dry-run, then the streamed report equals the whole-file report, with any batch size', async () => {
    const { t, surveyor } = await app();
    const text = mixedFile();
    const whole = (await planImport(t.orm.em.fork(), 'csv', text)).report;
    expect(whole.summary.refuse).toBeGreaterThan(3);
    for (const batchRows of [1, 7, 1000]) {
      const streamed = await planCsvStream(t.orm.em.fork(), Readable.from([text]), { batchRows });
      expect(streamed.report).toEqual(whole);
    }
    const direct = await surveyor.post('/api/import/dry-run', { format: 'csv', text });
    const job = await importJob(surveyor, 'dry-run', text);
    expect(job.job.state).toBe('done');
    expect(job.report).toEqual(direct.body);
  });

  it('when a file is committed as a job, then the report and the stored inventory equal the direct commit’s', async () => {
    const rows: string[][] = [];
    for (let i = 0; i < 30; i++) rows.push([...lineCells('Commit feeder'), ...spanCells(`CF-${i}`, -130.4 + i * 0.002, `CF-${i + 1}`, -130.4 + (i + 1) * 0.002, '7.9', i === 5 ? '[{"kindId":"road-crossing","severity":"high"}]' : '')]);
    const text = csv(rows);
    const a = await app();
    const b = await app();
    const direct = await a.surveyor.post('/api/import/commit', { format: 'csv', text });
    expect(direct.status).toBe(200);
    const job = await importJob(b.surveyor, 'commit', text);
    expect(job.job.state).toBe('done');
    expect(job.report).toEqual(direct.body);
    expect(await inventoryOf(b.t)).toEqual(await inventoryOf(a.t));
    // A second import of an edited file updates in both alike.
    rows[4] = [...lineCells('Commit feeder'), ...spanCells('CF-4', -130.392, 'CF-5', -130.39, '8.4')];
    const edited = csv(rows);
    const direct2 = await a.surveyor.post('/api/import/commit', { format: 'csv', text: edited });
    const job2 = await importJob(b.surveyor, 'commit', edited);
    expect(job2.report).toEqual(direct2.body);
    expect(job2.report.summary).toEqual({ create: 0, update: 1, unchanged: 29, refuse: 0 });
    expect(await inventoryOf(b.t)).toEqual(await inventoryOf(a.t));
  });

  it('when rows are bad, then each is named with its row and column, and a commit stores nothing', async () => {
    const { t, surveyor } = await app();
    const rows: string[][] = [];
    for (let i = 0; i < 1205; i++) rows.push([...lineCells('Bad rows feeder'), ...spanCells(`BR-${i}`, -130.1 + i * 0.0005, `BR-${i + 1}`, -130.1 + (i + 1) * 0.0005, i === 1202 ? 'tall' : '7.9')]);
    rows[2] = [...lineCells('Bad rows feeder'), ...spanCells('BR-2', -130.099, 'BR-3', -130.0985, '-4')];
    const text = csv(rows);
    const dry = await importJob(surveyor, 'dry-run', text);
    const refused = dry.report.rows.filter((r: any) => r.action === 'refuse');
    expect(refused.map((r: any) => r.row)).toEqual([3, 1203]);
    expect(refused[0].reasons.join(' ')).toMatch(/^clearance_m: /);
    expect(refused[1].reasons.join(' ')).toMatch(/^clearance_m: /);
    const commit = await importJob(surveyor, 'commit', text);
    expect(commit.job.state).toBe('failed');
    expect(commit.job.error).toMatch(/Nothing was imported: 2 row\(s\) refused/);
    expect(commit.report.rows.filter((r: any) => r.action === 'refuse').map((r: any) => r.row)).toEqual([3, 1203]);
    expect(await t.orm.em.fork().count(Span, {})).toBe(0);
  });

  it('when a large file is imported, then rows are held a batch at a time and written in parts, with determinate progress', async () => {
    const { t, surveyor } = await app();
    const rows: string[][] = [];
    for (let i = 0; i < 5000; i++) rows.push([...lineCells(`Large feeder ${Math.floor(i / 1000)}`), ...spanCells(`LF-${i}`, -130 + i * 0.0003, `LF-${i}b`, -130 + i * 0.0003 + 0.0002)]);
    const text = csv(rows);
    // The reader never holds more than one batch of parsed rows, whatever the file's length.
    const em = t.orm.em.fork();
    const planned = await planCsvStream(em, Readable.from([text]), { batchRows: 400 });
    expect(planned.report.summary.create).toBe(5000);
    expect(planned.maxHeld).toBe(400);
    // Writing goes in parts: the lines, then structures and spans 400 at a time, each its own transaction.
    const user = (await em.findOne(User, { email: 'surveyor@roostline.test' }))!;
    const written = await applyPlanInParts(em, user, planned.plan, { batchRows: 400 });
    expect(written.parts).toBe(1 + Math.ceil(10_000 / 400) + Math.ceil(5000 / 400));
    expect(await t.orm.em.fork().count(Span, {})).toBe(5000);
    // Through the job (a second file): progress counts rows checked, then rows written, up to the total.
    const more = csv(rows.map((r) => r.map((c) => c.replace(/^LF-/, 'LG-').replace(/^Large feeder/, 'Larger feeder'))));
    const job = await importJob(surveyor, 'commit', more);
    expect(job.job).toMatchObject({ state: 'done', done: 10_000, total: 10_000 });
    const dones = job.seen.map((s: any) => s.done);
    expect(dones).toEqual([...dones].sort((x, y) => x - y));
    expect(job.seen.every((s: any) => s.total === 0 || s.total === 10_000)).toBe(true);
    expect(job.report.summary.create).toBe(5000);
    expect(await t.orm.em.fork().count(Span, {})).toBe(10_000);
  }, 120_000);

  it('when the upload is empty, binary or lacks a mode, then 4xx names the field and no job is made', async () => {
    const { surveyor } = await app();
    const empty = await surveyor.upload('/api/import/jobs?mode=dry-run').attach('file', Buffer.from('  \n'), { filename: 'x.csv', contentType: 'text/csv' });
    expect(empty.status).toBe(400);
    expect(empty.body.error.issues[0].path).toBe('file');
    const bin = await surveyor.upload('/api/import/jobs?mode=dry-run').attach('file', Buffer.from([0x89, 0x50, 0, 1, 2]), { filename: 'x.csv' });
    expect(bin.status).toBe(415);
    const noMode = await surveyor.upload('/api/import/jobs').attach('file', Buffer.from(HEADER + '\n'), { filename: 'x.csv', contentType: 'text/csv' });
    expect(noMode.status).toBe(400);
    expect(noMode.body.error.issues[0].path).toBe('mode');
    const planner = await apps[0].as('planner');
    expect((await planner.upload('/api/import/jobs?mode=dry-run').attach('file', Buffer.from(HEADER + '\n'), { filename: 'x.csv' })).status).toBe(403);
  });
});
