import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';
import { buildLine, completeSpan, LINE_69 } from './inventory-fixtures.ts';
import { geodesicInverse } from '../../shared/engineering/geodesic.ts';
import { AuditEntry } from '../../server/modules/audit/audit.entity.ts';
import { Span } from '../../server/modules/inventory/span.entity.ts';

let t: TestApp;
let surveyor: Client;
let safety: Client;
let planner: Client;

beforeAll(async () => {
  t = await makeTestApp({ signInBurst: 1000 });
  [surveyor, safety, planner] = await Promise.all([t.as('surveyor'), t.as('safety'), t.as('planner')]);
});
afterAll(() => t.close());

let lineSeq = 0;
const fresh = (n = 3) => buildLine(surveyor, n, { name: `Edit line ${++lineSeq}` });

describe('creating spans', () => {
  it('when a catalogue code word is given, then size, diameter and resistances come from the catalogue', async () => {
    const { spans } = await fresh(2);
    // ACSR Hawk 477 kcmil 26/7: OD 21.79 mm, R_AC 0.0366 / 0.0438 Ω per 1000 ft at 25 / 75 °C (textbook ACSR table, engineering.md §4).
    expect(spans[0].conductor).toMatchObject({ codeWord: 'Hawk', size: '477 kcmil 26/7', material: 'ACSR', diameterMm: 21.79, tempLowC: 25, tempHighC: 75, source: 'catalogue' });
    expect(spans[0].conductor.resistanceLowOhmPerM).toBeCloseTo(0.0366 / 304.8, 10);
    expect(spans[0].conductor.resistanceHighOhmPerM).toBeCloseTo(0.0438 / 304.8, 10);
    expect(spans[0].status).toBe('draft');
    expect(spans[0].version).toBe(1);
    expect(spans[0].loadCurrentSource).toBe('line');
    expect(spans[0].loadCurrentA).toBe(LINE_69.loadTypicalA);
  });

  it('when the span is created, then its length is the WGS84 geodesic between its structures', async () => {
    const { spans, structures } = await fresh(2);
    const [a, b] = structures;
    // Karney (2013) inverse problem on WGS84 via GeographicLib (engineering.md §7).
    const expected = geodesicInverse({ latDeg: a.lat, lonDeg: a.lon }, { latDeg: b.lat, lonDeg: b.lon }).lengthM;
    expect(spans[0].lengthM).toBeCloseTo(expected, 6);
    // 0.002° of longitude at 30.2° S on WGS84 is about 192.6 m (GeographicLib; cos-latitude estimate 192.5 m, common practice).
    expect(spans[0].lengthM).toBeGreaterThan(192);
    expect(spans[0].lengthM).toBeLessThan(193);
  });

  it('when a custom conductor has no diameter, then 400 names conductor.diameterMm', async () => {
    const { line, structures } = await fresh(2);
    const res = await surveyor.post('/api/spans', { lineId: line.id, fromStructureId: structures[1].id, toStructureId: structures[0].id, conductor: { material: 'AAAC', size: '394.5 kcmil' } });
    expect(res.status).toBe(400);
    expect(res.body.error.issues.map((i: any) => i.path)).toEqual(['conductor.diameterMm']);
  });

  it('when a custom conductor has a diameter, then it is kept as entered', async () => {
    const { line, structures } = await buildLine(surveyor, 3, { name: 'Custom conductor line' });
    const res = await surveyor.patch(`/api/spans/${(await surveyor.get(`/api/spans?lineId=${line.id}&sort=line`)).body.items[0].id}`, {
      version: 1,
      conductor: { material: 'AAAC', size: '394.5 kcmil', diameterMm: 18.3 },
    });
    expect(res.status).toBe(200);
    expect(res.body.conductor).toMatchObject({ codeWord: null, material: 'AAAC', size: '394.5 kcmil', diameterMm: 18.3, source: 'custom' });
    expect(structures).toHaveLength(3);
  });

  it('when fields are invalid, then 400 names each path', async () => {
    const { line, structures } = await fresh(2);
    const res = await surveyor.post('/api/spans', {
      lineId: line.id,
      fromStructureId: structures[0].id,
      toStructureId: structures[0].id,
      clearanceM: -2,
      terrain: 'moon',
      surveyDate: '2026-13-45',
      conductor: { codeWord: 'Hawk' },
      hazards: [{ kindId: 'road-crossing', severity: 'extreme' }],
    });
    expect(res.status).toBe(400);
    const paths = res.body.error.issues.map((i: any) => i.path);
    expect(paths).toEqual(expect.arrayContaining(['clearanceM', 'terrain', 'surveyDate', 'hazards.0.severity']));
    for (const i of res.body.error.issues) expect(i.message).not.toMatch(/^Invalid input/);
    const same = await surveyor.post('/api/spans', { lineId: line.id, fromStructureId: structures[0].id, toStructureId: structures[0].id });
    expect(same.status).toBe(400);
    expect(same.body.error.issues.map((i: any) => i.path)).toEqual(['toStructureId']);
    const low = await surveyor.post('/api/spans', { lineId: line.id, fromStructureId: structures[0].id, toStructureId: structures[1].id, clearanceM: 7, lowestClearanceM: 8 });
    expect(low.body.error.issues.map((i: any) => i.path)).toEqual(['lowestClearanceM']);
  });

  it('when the code word or hazard kind is unknown, or a structure is on another line, then 400 names it', async () => {
    const a = await fresh(2);
    const b = await fresh(2);
    const c = await fresh(3);
    const bad1 = await surveyor.post('/api/spans', { ...completeSpan(c.line.id, c.structures[0].id, c.structures[2].id), conductor: { codeWord: 'Pelican-ish' } });
    expect(bad1.status).toBe(400);
    expect(bad1.body.error.issues[0].path).toBe('conductor.codeWord');
    // The same pair again (either direction) is a second span between the same structures: 409.
    const dup = await surveyor.post('/api/spans', completeSpan(a.line.id, a.structures[1].id, a.structures[0].id));
    expect(dup.status).toBe(409);
    const bad3 = await surveyor.post('/api/spans', { ...completeSpan(c.line.id, c.structures[0].id, c.structures[2].id), hazards: [{ kindId: 'dragons', severity: 'high' }] });
    expect(bad3.status).toBe(400);
    expect(bad3.body.error.issues[0].path).toBe('hazards.0.kindId');
    const bad4 = await surveyor.post('/api/spans', completeSpan(a.line.id, a.structures[0].id, b.structures[1].id));
    expect(bad4.status).toBe(400);
    expect(bad4.body.error.issues[0].path).toBe('toStructureId');
  });

  it('when a planner or safety officer tries to create a span, then 403', async () => {
    const { line, structures } = await fresh(3);
    for (const c of [planner, safety]) expect((await c.post('/api/spans', completeSpan(line.id, structures[0].id, structures[2].id))).status).toBe(403);
  });
});

describe('versioned edits', () => {
  it('when a PATCH carries a stale version, then 409 with the saved record in error.current and nothing changes', async () => {
    const { spans } = await fresh(2);
    const id = spans[0].id;
    const first = await surveyor.patch(`/api/spans/${id}`, { version: 1, clearanceM: 9.1 });
    expect(first.status).toBe(200);
    expect(first.body.version).toBe(2);
    const stale = await surveyor.patch(`/api/spans/${id}`, { version: 1, clearanceM: 4.0, terrain: 'road' });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('conflict');
    expect(stale.body.error.current).toMatchObject({ id, version: 2, clearanceM: 9.1, terrain: 'open-field' });
    const saved = await planner.get(`/api/spans/${id}`);
    expect(saved.body).toMatchObject({ version: 2, clearanceM: 9.1, terrain: 'open-field' });
  });

  it('when two saves of the same version race, then exactly one wins and the other gets 409', async () => {
    const { spans } = await fresh(2);
    const id = spans[0].id;
    const [a, b] = await Promise.all([
      surveyor.patch(`/api/spans/${id}`, { version: 1, clearanceM: 9.3 }),
      surveyor.patch(`/api/spans/${id}`, { version: 1, clearanceM: 9.4 }),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 409]);
    const winner = a.status === 200 ? a : b;
    const loser = a.status === 200 ? b : a;
    expect(loser.body.error.current).toMatchObject({ id, version: 2 });
    const saved = await planner.get(`/api/spans/${id}`);
    expect(saved.body).toMatchObject({ version: 2, clearanceM: winner.body.clearanceM });
  });

  it('when version is missing, then 400 names version', async () => {
    const { spans } = await fresh(2);
    const res = await surveyor.patch(`/api/spans/${spans[0].id}`, { clearanceM: 9 });
    expect(res.status).toBe(400);
    expect(res.body.error.issues.map((i: any) => i.path)).toEqual(['version']);
  });

  it('when the PATCH changes nothing, then the version stays', async () => {
    const { spans } = await fresh(2);
    const res = await surveyor.patch(`/api/spans/${spans[0].id}`, { version: 1, clearanceM: spans[0].clearanceM });
    expect(res.status).toBe(200);
    expect(res.body.version).toBe(1);
  });

  it('when hazards are replaced, then kept ids survive and removed ones go', async () => {
    const { spans } = await fresh(2);
    const [h] = spans[0].hazards;
    const res = await surveyor.patch(`/api/spans/${spans[0].id}`, {
      version: 1,
      hazards: [{ id: h.id, kindId: h.kindId, severity: 'high', positionAlongM: 42, note: h.note }, { kindId: 'road-crossing', severity: 'medium', positionAlongM: 120 }],
    });
    expect(res.status).toBe(200);
    expect(res.body.hazards).toHaveLength(2);
    expect(res.body.hazards.find((x: any) => x.id === h.id)).toMatchObject({ severity: 'high', positionAlongM: 42 });
    const beyond = await surveyor.patch(`/api/spans/${spans[0].id}`, { version: 2, hazards: [{ kindId: 'road-crossing', severity: 'low', positionAlongM: 5000 }] });
    expect(beyond.status).toBe(400);
    expect(beyond.body.error.issues[0].path).toBe('hazards.0.positionAlongM');
  });

  it('when a span awaits review, then the surveyor cannot edit it (409)', async () => {
    const { spans } = await fresh(2);
    await surveyor.post(`/api/spans/${spans[0].id}/submit`);
    const res = await surveyor.patch(`/api/spans/${spans[0].id}`, { version: 2, clearanceM: 7 });
    expect(res.status).toBe(409);
  });
});

describe('editing an approved span', () => {
  async function approved() {
    const { spans } = await fresh(2);
    const id = spans[0].id;
    await surveyor.post(`/api/spans/${id}/submit`);
    const ok = await safety.post(`/api/spans/${id}/approve`);
    expect(ok.body.status).toBe('approved');
    return ok.body;
  }

  it.each([
    ['clearanceM', { clearanceM: 9.0 }],
    ['conductor', { conductor: { codeWord: 'Dove' } }],
    ['loadCurrentA', { loadCurrentA: 410 }],
    ['hazards', { hazards: [] }],
    ['terrain', { terrain: 'road' }],
  ])('when the surveyor changes %s, then the span goes back to submitted', async (_f, patch) => {
    const span = await approved();
    const res = await surveyor.patch(`/api/spans/${span.id}`, { version: span.version, ...patch });
    expect(res.status).toBe(200);
    expect(res.body.status).toBe('submitted');
    expect(res.body.approvedAt).toBeNull();
    const [entry] = await t.orm.em.fork().find(AuditEntry, { recordId: span.id, action: 'span.update.back-to-review' });
    expect((entry!.before as any).status).toBe('approved');
    expect((entry!.after as any).status).toBe('submitted');
  });

  it('when only the phase position changes, then it stays approved', async () => {
    const span = await approved();
    const res = await surveyor.patch(`/api/spans/${span.id}`, { version: span.version, phasePosition: 'B (middle)' });
    expect(res.status).toBe(200);
    expect(res.body.status).toBe('approved');
    expect(res.body.phasePosition).toBe('B (middle)');
  });

  it('when a structure of an approved span moves, then the span is re-measured and back in review', async () => {
    const { spans, structures } = await fresh(3);
    const id = spans[0].id;
    await surveyor.post(`/api/spans/${id}/submit`);
    await safety.post(`/api/spans/${id}/approve`);
    const mid = structures[1];
    const moved = await surveyor.patch(`/api/structures/${mid.id}`, { version: mid.version, lat: mid.lat - 0.001, lon: mid.lon + 0.0005 });
    expect(moved.status).toBe(200);
    expect(moved.body.updatedSpanIds.sort()).toEqual([spans[0].id, spans[1].id].sort());
    const [a, b] = await Promise.all([planner.get(`/api/spans/${spans[0].id}`), planner.get(`/api/spans/${spans[1].id}`)]);
    // Karney (2013) geodesic on WGS84 via GeographicLib (engineering.md §7).
    const lenA = geodesicInverse({ latDeg: structures[0].lat, lonDeg: structures[0].lon }, { latDeg: mid.lat - 0.001, lonDeg: mid.lon + 0.0005 }).lengthM;
    const lenB = geodesicInverse({ latDeg: mid.lat - 0.001, lonDeg: mid.lon + 0.0005 }, { latDeg: structures[2].lat, lonDeg: structures[2].lon }).lengthM;
    expect(a.body.lengthM).toBeCloseTo(lenA, 6);
    expect(b.body.lengthM).toBeCloseTo(lenB, 6);
    expect(a.body.lengthM).not.toBeCloseTo(spans[0].lengthM, 1);
    expect(a.body.status).toBe('submitted');
    expect(b.body.status).toBe('draft');
    const entries = await t.orm.em.fork().find(AuditEntry, { recordId: mid.id, action: 'structure.move' });
    expect(entries).toHaveLength(1);
    expect((entries[0]!.before as any).lat).toBe(mid.lat);
  });

  it('when a structure PATCH is stale, then 409 with the saved structure', async () => {
    const { structures } = await fresh(2);
    const s = structures[0];
    expect((await surveyor.patch(`/api/structures/${s.id}`, { version: 1, attachmentHeightM: 15 })).status).toBe(200);
    const stale = await surveyor.patch(`/api/structures/${s.id}`, { version: 1, attachmentHeightM: 11 });
    expect(stale.status).toBe(409);
    expect(stale.body.error.current).toMatchObject({ id: s.id, attachmentHeightM: 15, version: 2 });
  });
});

describe('lines, structures and catalogues', () => {
  it('when anyone signed in lists lines, then each carries voltage and frequency', async () => {
    await fresh(2);
    const res = await planner.get('/api/lines');
    expect(res.status).toBe(200);
    expect(res.body.items[0]).toMatchObject({ id: expect.any(String), name: expect.any(String), voltageKv: 69, frequencyHz: 60 });
    expect((await t.client().get('/api/lines')).status).toBe(401);
  });

  it('when a line has min > typical, then 400 names loadMinA; a bad profile names loadProfileA', async () => {
    const res = await surveyor.post('/api/lines', { ...LINE_69, name: 'Bad loads', loadMinA: 400 });
    expect(res.status).toBe(400);
    expect(res.body.error.issues.map((i: any) => i.path)).toContain('loadMinA');
    const p = await surveyor.post('/api/lines', { ...LINE_69, name: 'Bad profile', loadProfileA: [1, 2, 3] });
    expect(p.body.error.issues.map((i: any) => i.path)).toContain('loadProfileA');
    expect((await planner.post('/api/lines', { ...LINE_69, name: 'Planner line' })).status).toBe(403);
  });

  it('when a line load changes, then spans inheriting it show the new load', async () => {
    const { line, spans } = await fresh(2);
    const res = await surveyor.patch(`/api/lines/${line.id}`, { version: 1, loadTypicalA: 300 });
    expect(res.status).toBe(200);
    expect((await planner.get(`/api/spans/${spans[0].id}`)).body.loadCurrentA).toBe(300);
    const [entry] = await t.orm.em.fork().find(AuditEntry, { recordId: line.id, action: 'line.update' });
    expect((entry!.before as any).loadTypicalA).toBe(320);
    expect((entry!.after as any).loadTypicalA).toBe(300);
  });

  it('when structures are listed by line, then only that line comes back; a bad structure is 400 by field', async () => {
    const { line } = await fresh(3);
    const res = await planner.get(`/api/structures?lineId=${line.id}`);
    expect(res.body.items).toHaveLength(3);
    const bad = await surveyor.post('/api/structures', { lineId: line.id, lat: 95, lon: -130, kind: 'pylon', attachmentHeightM: 0 });
    expect(bad.status).toBe(400);
    expect(bad.body.error.issues.map((i: any) => i.path).sort()).toEqual(['attachmentHeightM', 'kind', 'lat']);
  });

  it('when the conductor catalogue is read, then it holds the six ACSR sizes', async () => {
    const res = await planner.get('/api/conductors');
    expect(res.body.items.map((c: any) => c.codeWord)).toEqual(['Penguin', 'Partridge', 'Linnet', 'Hawk', 'Dove', 'Drake']);
    // Drake 795 kcmil 26/7: OD 28.14 mm, 1.094 lb/ft (sag-tension tables, engineering.md §4).
    expect(res.body.items[5]).toMatchObject({ diameterMm: 28.14 });
    expect(res.body.items[5].weightKgPerM).toBeCloseTo((1.094 * 0.45359237) / 0.3048, 6);
  });

  it('when safety adds and retires a hazard kind, then new hazards cannot use it; others get 403', async () => {
    expect((await surveyor.post('/api/hazard-kinds', { id: 'guy-wire', label: 'Guy wire', defaultSeverity: 'low' })).status).toBe(403);
    const created = await safety.post('/api/hazard-kinds', { id: 'guy-wire', label: 'Guy wire', defaultSeverity: 'low' });
    expect(created.status).toBe(201);
    expect((await safety.patch('/api/hazard-kinds/guy-wire', { active: false })).body.active).toBe(false);
    const { spans } = await fresh(2);
    const res = await surveyor.patch(`/api/spans/${spans[0].id}`, { version: 1, hazards: [{ kindId: 'guy-wire', severity: 'low' }] });
    expect(res.status).toBe(400);
    expect(res.body.error.issues[0].path).toBe('hazards.0.kindId');
    const list = await planner.get('/api/hazard-kinds');
    expect(list.body.items.map((k: any) => k.id)).toEqual(expect.arrayContaining(['vegetation-encroachment', 'road-crossing', 'rail-crossing', 'water-crossing', 'crossing-circuit', 'public-access']));
  });
});

describe('audit', () => {
  it('when a span is created and edited, then each change has an entry with before and after', async () => {
    const { spans } = await fresh(2);
    const id = spans[0].id;
    expect((await surveyor.patch(`/api/spans/${id}`, { version: 1, clearanceM: 9.2 })).status).toBe(200);
    const entries = await t.orm.em.fork().find(AuditEntry, { recordType: 'span', recordId: id }, { orderBy: { id: 'asc' } });
    expect(entries.map((e) => e.action)).toEqual(['span.create', 'span.update']);
    expect(entries[0]!.before).toBeNull();
    expect((entries[1]!.before as any).clearanceM).toBe(9.5);
    expect((entries[1]!.after as any).clearanceM).toBe(9.2);
    const row = await t.orm.em.fork().findOneOrFail(Span, { id });
    expect(entries[1]!.actorId).toBe(row.surveyorId);
  });
});
