import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';
import { buildLine } from './inventory-fixtures.ts';
import { Line } from '../../server/modules/inventory/line.entity.ts';
import { Span } from '../../server/modules/inventory/span.entity.ts';
import { Structure } from '../../server/modules/inventory/structure.entity.ts';
import { AuditEntry } from '../../server/modules/audit/audit.entity.ts';
import { xmlEscape } from '../../server/modules/import-export/formats.ts';
import { INVENTORY_CSV_COLUMNS } from '../../shared/schemas/inventory.ts';
import { SPAN_STATUS_COLOURS, kmlColour } from '../../shared/span-status-colours.ts';
import { geodesicInverse } from '../../shared/engineering/geodesic.ts';

let t: TestApp;
let surveyor: Client;
let safety: Client;
let planner: Client;
let admin: Client;

beforeAll(async () => {
  t = await makeTestApp({ signInBurst: 1000 });
  [surveyor, safety, planner, admin] = await Promise.all([t.as('surveyor'), t.as('safety'), t.as('planner'), t.as('admin')]);
});
afterAll(() => t.close());

const HEADER =
  'line_name,line_owner,voltage_kv,frequency_hz,phases,load_typical_a,load_min_a,load_peak_a,from_label,from_lat,from_lon,from_kind,from_attachment_height_m,to_label,to_lat,to_lon,to_kind,to_attachment_height_m,conductor_code_word,clearance_m,lowest_clearance_m,terrain,survey_date,hazards';
function csv(lineName: string, rows: string[][]) {
  return [HEADER, ...rows.map((r) => [lineName, 'Harrow Vale Power Cooperative', '12.47', '60', '3', '180', '60', '260', ...r].join(','))].join('\n');
}
const row = (from: string, fromLon: number, to: string, toLon: number, extra: string[] = ['Penguin', '7.9', '7.5', 'open-field', '2026-10-02', '']) => [
  from,
  '-30.1',
  String(fromLon),
  'pole',
  '11',
  to,
  '-30.1',
  String(toLon),
  'pole',
  '11',
  ...extra,
];

async function counts() {
  const em = t.orm.em.fork();
  return { lines: await em.count(Line, {}), structures: await em.count(Structure, {}), spans: await em.count(Span, {}) };
}

describe('CSV import', () => {
  const file = csv('Import feeder 7', [row('IF7-001', -130.5, 'IF7-002', -130.498), row('IF7-002', -130.498, 'IF7-003', -130.496)]);

  it('when a new inventory is dry-run, then each row says create and nothing is written', async () => {
    const before = await counts();
    const res = await surveyor.post('/api/import/dry-run', { format: 'csv', text: file });
    expect(res.status).toBe(200);
    expect(res.body.rows.map((r: any) => [r.row, r.action])).toEqual([
      [1, 'create'],
      [2, 'create'],
    ]);
    expect(res.body.summary).toEqual({ create: 2, update: 0, unchanged: 0, refuse: 0 });
    expect(res.body.committed).toBe(false);
    expect(await counts()).toEqual(before);
  });

  it('when committed, then the line, 3 structures and 2 spans exist; a second dry run says unchanged', async () => {
    const before = await counts();
    const res = await surveyor.upload('/api/import/commit').attach('file', Buffer.from(file), { filename: 'feeder7.csv', contentType: 'text/csv' });
    expect(res.status).toBe(200);
    expect(res.body.committed).toBe(true);
    expect(await counts()).toEqual({ lines: before.lines + 1, structures: before.structures + 3, spans: before.spans + 2 });
    const again = await surveyor.post('/api/import/dry-run', { format: 'csv', text: file });
    expect(again.body.rows.map((r: any) => r.action)).toEqual(['unchanged', 'unchanged']);
    const em = t.orm.em.fork();
    const line = await em.findOneOrFail(Line, { name: 'Import feeder 7' });
    const spans = await em.find(Span, { lineId: line.id });
    expect(spans.every((s) => s.status === 'draft' && s.conductorCodeWord === 'Penguin' && s.conductorDiameterMm === 14.3)).toBe(true);
    // Karney geodesic on WGS84 (GeographicLib, engineering.md §7).
    const expected = geodesicInverse({ latDeg: -30.1, lonDeg: -130.5 }, { latDeg: -30.1, lonDeg: -130.498 }).lengthM;
    expect(spans.map((s) => s.lengthM)).toContainEqual(expect.closeTo(expected, 6));
    expect(await em.count(AuditEntry, { action: 'span.import-create' })).toBeGreaterThanOrEqual(2);
  });

  it('when a re-import changes a clearance and moves a structure, then those rows say update with the fields', async () => {
    const changed = csv('Import feeder 7', [
      row('IF7-001', -130.5, 'IF7-002', -130.498, ['Penguin', '8.4', '7.5', 'open-field', '2026-10-02', '']),
      row('IF7-002', -130.498, 'IF7-003', -130.4955),
    ]);
    const res = await surveyor.post('/api/import/dry-run', { format: 'csv', text: changed });
    expect(res.body.rows.map((r: any) => r.action)).toEqual(['update', 'update']);
    expect(res.body.rows[0].reasons.join(' ')).toContain('clearance_m');
    expect(res.body.rows[1].reasons.join(' ')).toContain('to_lon');
  });

  it('when one row is bad, then commit is 400 with the report and the database is untouched', async () => {
    const before = await counts();
    const auditBefore = await t.orm.em.fork().count(AuditEntry, {});
    const bad = csv('Import feeder 8', [
      row('IF8-001', -130.4, 'IF8-002', -130.398),
      row('IF8-002', -130.398, 'IF8-003', -130.396, ['Albatross-X', '7.9', '7.5', 'open-field', '2026-10-02', '']),
      row('IF8-003', -130.396, 'IF8-004', -130.394, ['Penguin', 'tall', '7.5', 'lava', '2026-10-02', '']),
    ]);
    const dry = await surveyor.post('/api/import/dry-run', { format: 'csv', text: bad });
    expect(dry.body.rows.map((r: any) => r.action)).toEqual(['create', 'refuse', 'refuse']);
    expect(dry.body.rows[1].reasons[0]).toMatch(/conductor_code_word: "Albatross-X" is not in the conductor catalogue/);
    expect(dry.body.rows[2].reasons.join('; ')).toMatch(/clearance_m: .*number/);
    expect(dry.body.rows[2].reasons.join('; ')).toMatch(/terrain/);
    const res = await surveyor.post('/api/import/commit', { format: 'csv', text: bad });
    expect(res.status).toBe(400);
    expect(res.body.error.report.summary).toEqual({ create: 1, update: 0, unchanged: 0, refuse: 2 });
    expect(res.body.error.issues.map((i: any) => i.path)).toEqual(expect.arrayContaining(['row 2', 'row 3']));
    expect(await counts()).toEqual(before);
    expect(await t.orm.em.fork().count(AuditEntry, {})).toBe(auditBefore);
  });

  it('when rows disagree about a line or a structure, then the later row is refused', async () => {
    const file2 = [
      HEADER,
      ['Import feeder 9', 'HVPC', '12.47', '60', '3', '180', '60', '260', ...row('A', -130.3, 'B', -130.298)].join(','),
      ['Import feeder 9', 'HVPC', '69', '60', '3', '180', '60', '260', ...row('B', -130.298, 'C', -130.296)].join(','),
      ['Import feeder 9', 'HVPC', '12.47', '60', '3', '180', '60', '260', ...row('C', -130.2999, 'D', -130.294)].join(','),
    ].join('\n');
    const res = await surveyor.post('/api/import/dry-run', { format: 'csv', text: file2 });
    expect(res.body.rows.map((r: any) => r.action)).toEqual(['create', 'refuse', 'create']);
    expect(res.body.rows[1].reasons[0]).toMatch(/voltage_kv: differs from row 1/);
  });

  it('when a new line lacks its voltage, or the header lacks a key column, then the report says why', async () => {
    const noVoltage = 'line_name,from_label,from_lat,from_lon,from_kind,from_attachment_height_m,to_label,to_lat,to_lon,to_kind,to_attachment_height_m\nNo volts,A,-30.1,-130.1,pole,10,B,-30.1,-130.099,pole,10';
    const r1 = await surveyor.post('/api/import/dry-run', { format: 'csv', text: noVoltage });
    expect(r1.body.rows[0].action).toBe('refuse');
    expect(r1.body.rows[0].reasons.join(' ')).toMatch(/voltage_kv/);
    const r2 = await surveyor.post('/api/import/dry-run', { format: 'csv', text: 'name,lat\nx,1' });
    expect(r2.body.rows[0]).toMatchObject({ row: 0, action: 'refuse' });
    expect(r2.body.rows[0].reasons[0]).toMatch(/line_name, from_label, to_label/);
  });

  it('when the template is downloaded and dry-run, then its example row would be created', async () => {
    const tpl = await planner.get('/api/import/template.csv');
    expect(tpl.status).toBe(200);
    expect(tpl.text.split('\r\n')[0]).toBe(INVENTORY_CSV_COLUMNS.join(','));
    const res = await surveyor.post('/api/import/dry-run', { format: 'csv', text: tpl.text });
    expect(res.body.rows).toEqual([expect.objectContaining({ row: 1, action: 'create', reasons: [] })]);
  });

  it('when a planner or safety officer imports, then 403; admin may', async () => {
    expect((await planner.post('/api/import/dry-run', { format: 'csv', text: file })).status).toBe(403);
    expect((await safety.post('/api/import/dry-run', { format: 'csv', text: file })).status).toBe(403);
    expect((await admin.post('/api/import/dry-run', { format: 'csv', text: file })).status).toBe(200);
  });

  it('when the body is empty or the file is binary, then 400 / 415 naming the field', async () => {
    const empty = await surveyor.post('/api/import/dry-run', { format: 'csv', text: '' });
    expect(empty.status).toBe(400);
    expect(empty.body.error.issues[0].path).toBe('text');
    const bin = await surveyor.upload('/api/import/dry-run').attach('file', Buffer.from([0x89, 0x50, 0x4e, 0x47, 0, 0, 1, 2]), { filename: 'x.csv' });
    expect(bin.status).toBe(415);
  });
});

describe('export and round trip', () => {
  let lineId: string;
  beforeAll(async () => {
    const built = await buildLine(surveyor, 5, { name: 'Round trip line, "quoted" & <odd>' });
    lineId = built.line.id;
    // Mixed states and a custom conductor with a span-level load.
    await surveyor.patch(`/api/spans/${built.spans[1].id}`, { version: 1, conductor: { material: 'AAAC', size: '394.5 kcmil', diameterMm: 18.3, resistanceLowOhmPerM: 0.000145, tempLowC: 25, resistanceHighOhmPerM: 0.000172, tempHighC: 75 }, loadCurrentA: 275, phasePosition: 'C' });
    await surveyor.post(`/api/spans/${built.spans[0].id}/submit`);
    await safety.post(`/api/spans/${built.spans[0].id}/approve`);
    await surveyor.patch(`/api/lines/${lineId}`, { version: 1, loadProfileA: Array.from({ length: 24 }, (_, h) => 200 + 10 * h) });
  });

  it.each(['csv', 'geojson'] as const)('when the %s export is imported back as a dry run, then every row is unchanged', async (format) => {
    const exp = await planner.get(`/api/spans/export.${format}?lineId=${lineId}`);
    expect(exp.status).toBe(200);
    const text = exp.text ?? (typeof exp.body === 'string' ? exp.body : JSON.stringify(exp.body));
    const res = await surveyor.post('/api/import/dry-run', { format, text });
    expect(res.status).toBe(200);
    expect(res.body.summary.refuse).toBe(0);
    expect(res.body.summary.create).toBe(0);
    expect(res.body.summary.update).toBe(0);
    expect(res.body.rows.length).toBeGreaterThanOrEqual(4);
    expect(res.body.rows.every((r: any) => r.action === 'unchanged')).toBe(true);
  });

  it('when a text cell would start a spreadsheet formula, then the CSV export guards it and the import takes the guard off', async () => {
    const built = await buildLine(surveyor, 2, { name: '=HYPERLINK("x") line', owner: '+Owner' });
    const exp = await planner.get(`/api/spans/export.csv?lineId=${built.line.id}`);
    const cells = exp.text.split('\r\n')[1]!;
    expect(cells.startsWith(`"'=HYPERLINK(""x"") line",'+Owner,`)).toBe(true);
    const res = await surveyor.post('/api/import/dry-run', { format: 'csv', text: exp.text });
    expect(res.body.rows.map((r: any) => r.action)).toEqual(['unchanged']);
  });

  it('when exporting approved spans only, then the filter applies', async () => {
    const res = await planner.get(`/api/spans/export.geojson?status=approved&lineId=${lineId}`);
    const body = JSON.parse(res.text);
    const spans = body.features.filter((f: any) => f.geometry.type === 'LineString');
    expect(spans).toHaveLength(1);
    expect(spans[0].properties.status).toBe('approved');
    expect(res.headers['content-type']).toMatch(/application\/geo\+json/);
  });

  it('when exporting KML, then it is well-formed XML with the names escaped and one placemark per span', async () => {
    const res = await planner.get(`/api/spans/export.kml?lineId=${lineId}`);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/kml/);
    const text = res.text;
    expect(text.startsWith('<?xml version="1.0" encoding="UTF-8"?>')).toBe(true);
    expect(text).toContain('Round trip line, &quot;quoted&quot; &amp; &lt;odd&gt;');
    expect(text).not.toContain('<odd>');
    expect(text.match(/<Placemark>/g)).toHaveLength(4);
    // @ts-expect-error -- jsdom ships without type declarations in this install
    const { JSDOM } = await import('jsdom');
    const doc = new JSDOM(text, { contentType: 'text/xml' }).window.document;
    expect(doc.getElementsByTagName('parsererror')).toHaveLength(0);
    expect(doc.getElementsByTagName('LineString')).toHaveLength(4);
    expect(xmlEscape(`a<b>&'"`)).toBe('a&lt;b&gt;&amp;&apos;&quot;');
  });

  it('when exporting KML, then each status style uses the app palette in KML byte order (aabbggrr)', async () => {
    const text = (await planner.get(`/api/spans/export.kml?lineId=${lineId}`)).text;
    const styles = Object.fromEntries([...text.matchAll(/<Style id="span-(\w+)"><LineStyle><color>([0-9a-f]{8})<\/color>/g)].map((m) => [m[1], m[2]]));
    // OGC KML 2.2 (07-147r2) §16.9: kml:color is aabbggrr. The map draws approved spans #2e7d4f (rr=2e gg=7d bb=4f).
    expect(styles.approved).toBe('ff4f7d2e');
    expect(styles.returned).toBe('ff1e26b3');
    expect(Object.keys(styles).sort()).toEqual(Object.keys(SPAN_STATUS_COLOURS).sort());
    for (const [status, hex] of Object.entries(SPAN_STATUS_COLOURS)) expect(styles[status]).toBe(`ff${hex.slice(5, 7)}${hex.slice(3, 5)}${hex.slice(1, 3)}`);
    expect(kmlColour('#123456', 0x80)).toBe('80563412');
  });

  it('when an unknown export format is asked for, then 404', async () => {
    expect((await planner.get('/api/spans/export.shp')).status).toBe(404);
  });
});

describe('GeoJSON import and re-import effects', () => {
  const fc = (features: object[]) => JSON.stringify({ type: 'FeatureCollection', features });
  const lineProps = { lineName: 'Geo line 1', lineOwner: 'Harrow Vale Power Cooperative', voltageKv: 69, frequencyHz: 60, phases: 3, loadTypicalA: 250, loadMinA: 100, loadPeakA: 400 };
  const point = (label: string, lon: number, lat = -30.05) => ({ type: 'Feature', geometry: { type: 'Point', coordinates: [lon, lat] }, properties: { lineName: 'Geo line 1', label, kind: 'h-frame', attachmentHeightM: 16 } });
  const spanF = (a: string, aLon: number, b: string, bLon: number, extra: object = {}) => ({
    type: 'Feature',
    geometry: { type: 'LineString', coordinates: [[aLon, -30.05], [bLon, -30.05]] },
    properties: { ...lineProps, fromLabel: a, toLabel: b, conductor: { codeWord: 'hawk' }, clearanceM: 9, terrain: 'forest', surveyDate: '2026-09-09', hazards: [{ kindId: 'vegetation-encroachment', severity: 'high', positionAlongM: 50 }], ...extra },
  });

  it('when Points and LineStrings are imported, then structures and spans are created and a moved Point re-measures and re-reviews spans outside the file', async () => {
    const first = fc([point('G-1', -130.2), point('G-2', -130.198), point('G-3', -130.196), spanF('G-1', -130.2, 'G-2', -130.198), spanF('G-2', -130.198, 'G-3', -130.196)]);
    const res = await surveyor.post('/api/import/commit', { format: 'geojson', text: first });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.rows.map((r: any) => r.action)).toEqual(['create', 'create', 'create', 'create', 'create']);
    const line = (await planner.get('/api/lines')).body.items.find((l: any) => l.name === 'Geo line 1');
    const list = (await planner.get(`/api/spans?lineId=${line.id}&sort=line`)).body.items;
    expect(list.map((s: any) => s.conductor.codeWord)).toEqual(['Hawk', 'Hawk']);
    // Approve the second span, then move G-3 by a Point-only file: that span is not in the file but is re-measured.
    const second = list.find((s: any) => s.toStructureLabel === 'G-3');
    await surveyor.post(`/api/spans/${second.id}/submit`);
    expect((await safety.post(`/api/spans/${second.id}/approve`)).body.status).toBe('approved');
    const move = fc([point('G-3', -130.195)]);
    const dry = await surveyor.post('/api/import/dry-run', { format: 'geojson', text: move });
    expect(dry.body.rows[0]).toMatchObject({ action: 'update' });
    expect(dry.body.rows[0].reasons[0]).toContain('coordinates (lon)');
    expect((await surveyor.post('/api/import/commit', { format: 'geojson', text: move })).status).toBe(200);
    const after = (await planner.get(`/api/spans/${second.id}`)).body;
    expect(after.status).toBe('submitted');
    // Karney geodesic on WGS84 via GeographicLib (engineering.md §7).
    expect(after.lengthM).toBeCloseTo(geodesicInverse({ latDeg: -30.05, lonDeg: -130.198 }, { latDeg: -30.05, lonDeg: -130.195 }).lengthM, 6);
  });

  it('when a span awaiting review would change, then the row is refused; other feature types are refused by name', async () => {
    const line = (await planner.get('/api/lines')).body.items.find((l: any) => l.name === 'Geo line 1');
    const sp = (await planner.get(`/api/spans?lineId=${line.id}&status=submitted`)).body.items[0];
    expect(sp).toBeDefined();
    const res = await surveyor.post('/api/import/dry-run', {
      format: 'geojson',
      text: fc([spanF(sp.fromStructureLabel, -130.198, sp.toStructureLabel, -130.195, { clearanceM: 7.7 }), { type: 'Feature', geometry: { type: 'Polygon', coordinates: [] }, properties: {} }]),
    });
    expect(res.body.rows[0].action).toBe('refuse');
    expect(res.body.rows[0].reasons[0]).toMatch(/awaiting review/);
    expect(res.body.rows[1].action).toBe('refuse');
    expect(res.body.rows[1].reasons.join(' ')).toMatch(/Point .* or LineString/);
    const notJson = await surveyor.post('/api/import/dry-run', { format: 'geojson', text: '{"type":' });
    expect(notJson.body.rows[0].reasons[0]).toMatch(/Not valid JSON/);
  });
});

describe('a large import', () => {
  it('when 2000 span rows are dry-run and committed, then both finish in a few seconds', async () => {
    const rows: string[][] = [];
    for (let i = 0; i < 2000; i++) rows.push(row(`BIG-${i}`, -130.59 + i * 0.0002, `BIG-${i + 1}`, -130.59 + (i + 1) * 0.0002));
    const text = csv('Big import line', rows);
    let started = performance.now();
    const dry = await surveyor.upload('/api/import/dry-run').attach('file', Buffer.from(text), { filename: 'big.csv', contentType: 'text/csv' });
    const dryMs = performance.now() - started;
    expect(dry.status).toBe(200);
    expect(dry.body.summary.create).toBe(2000);
    started = performance.now();
    const commit = await surveyor.upload('/api/import/commit').attach('file', Buffer.from(text), { filename: 'big.csv', contentType: 'text/csv' });
    const commitMs = performance.now() - started;
    expect(commit.status).toBe(200);
    console.log(`import of ${text.length} bytes, 2000 span rows: dry run ${dryMs.toFixed(0)} ms, commit ${commitMs.toFixed(0)} ms`);
    expect(dryMs).toBeLessThan(10_000);
    expect(commitMs).toBeLessThan(20_000);
  }, 60_000);
});

