import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';
import { buildLine } from './inventory-fixtures.ts';
import { Photo } from '../../server/modules/photos/photo.entity.ts';

let t: TestApp;
let surveyor: Client;
let planner: Client;
let spans: any[];
let lineId: string;

beforeAll(async () => {
  t = await makeTestApp({ signInBurst: 1000 });
  [surveyor, planner] = await Promise.all([t.as('surveyor'), t.as('planner')]);
  const built = await buildLine(surveyor, 4, { name: 'Harvest filter line' });
  lineId = built.line.id;
  // Three load estimates: harvest power grows with the current (∝ I² below saturation, engineering.md §8).
  const loads = [120, 320, 600];
  spans = [];
  for (const [i, s] of built.spans.entries()) {
    const res = await surveyor.patch(`/api/spans/${s.id}`, { version: s.version, loadCurrentA: loads[i] });
    expect(res.status).toBe(200);
    spans.push(res.body);
  }
});
afterAll(() => t.close());

describe('filters on the stored assessment', () => {
  it('when spans are listed, then each carries the default assessment with harvestW and score', async () => {
    const res = await planner.get(`/api/spans?lineId=${lineId}`);
    expect(res.body.total).toBe(3);
    for (const s of res.body.items) {
      expect(s.assessment).toMatchObject({ harvestW: expect.any(Number), score: expect.any(Number), perchable: expect.any(Boolean) });
      expect(Array.isArray(s.assessment.gates)).toBe(true);
    }
  });

  it('when sorted by -harvestW, then the highest load comes first; minHarvestW cuts the weakest', async () => {
    const sorted = await planner.get(`/api/spans?lineId=${lineId}&sort=-harvestW`);
    const watts = sorted.body.items.map((s: any) => s.assessment.harvestW);
    expect(watts).toEqual([...watts].sort((a: number, b: number) => b - a));
    expect(sorted.body.items.map((s: any) => s.loadCurrentA)).toEqual([600, 320, 120]);
    const threshold = (watts[1] + watts[2]) / 2;
    const filtered = await planner.get(`/api/spans?lineId=${lineId}&minHarvestW=${threshold}`);
    expect(filtered.body.total).toBe(2);
    expect(filtered.body.items.every((s: any) => s.assessment.harvestW >= threshold)).toBe(true);
    const none = await planner.get(`/api/spans?lineId=${lineId}&minHarvestW=${watts[0] + 1}`);
    expect(none.body.total).toBe(0);
  });

  it('when minScore is given, then only spans scoring at least that come back', async () => {
    const all = (await planner.get(`/api/spans?lineId=${lineId}&sort=score`)).body.items.map((s: any) => s.assessment.score);
    expect(all).toEqual([...all].sort((a: number, b: number) => a - b));
    const cut = all[0] + 1e-6;
    const res = await planner.get(`/api/spans?lineId=${lineId}&minScore=${cut}`);
    expect(res.body.items.every((s: any) => s.assessment.score >= cut)).toBe(true);
    expect(res.body.total).toBe(all.filter((x: number) => x >= cut).length);
    expect((await planner.get('/api/spans?minScore=abc')).status).toBe(400);
  });
});

describe('span detail', () => {
  it('when photos are linked to the span, then photoIds lists them in upload order', async () => {
    const em = t.orm.em.fork();
    const uploader = spans[0].surveyorId;
    const now = Date.now();
    for (const [i, pid] of ['photo-a', 'photo-b'].entries()) {
      em.create(Photo, {
        id: pid,
        spanId: spans[0].id,
        hazardId: null,
        uploaderId: uploader,
        lat: -30.2,
        lon: -130.3,
        altitudeM: null,
        bearingDeg: null,
        bearingRef: null,
        takenAt: null,
        takenAtHasOffset: false,
        positionSource: null,
        contentType: 'image/jpeg',
        width: 10,
        height: 10,
        bytes: 100,
        storageKey: `test-${pid}`,
        createdAt: new Date(now + i * 1000),
      });
    }
    await em.flush();
    const res = await planner.get(`/api/spans/${spans[0].id}`);
    expect(res.body.photoIds).toEqual(['photo-a', 'photo-b']);
    expect((await planner.get(`/api/spans/${spans[1].id}`)).body.photoIds).toEqual([]);
  });

  it('when the span does not exist, then 404', async () => {
    const res = await planner.get('/api/spans/nope');
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not_found');
  });

  it('when a span has its own load estimate, then loadCurrentSource is span; cleared, it inherits the line again', async () => {
    expect(spans[0]).toMatchObject({ loadCurrentA: 120, loadCurrentSource: 'span' });
    const res = await surveyor.patch(`/api/spans/${spans[0].id}`, { version: spans[0].version, loadCurrentA: null });
    expect(res.body).toMatchObject({ loadCurrentA: 320, loadCurrentSource: 'line' });
  });
});
