// A test app for the review rules: surveyor, safety and planner signed in, one line, and submitted spans each on
// their own pair of structures at their own latitude (so a zone can cover one span alone).
import { expect } from 'vitest';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';
import { buildLine, completeSpan } from './inventory-fixtures.ts';

export interface ReviewFixture {
  t: TestApp;
  surveyor: Client;
  safety: Client;
  planner: Client;
  lineId: string;
  /** A submitted span, with fields overriding the complete fixture; `lat` is its structures' latitude (lon −130.45…−130.448). */
  submitted: (over?: Record<string, unknown>) => Promise<{ id: string; lat: number }>;
}

export async function openReviewFixture(): Promise<ReviewFixture> {
  const t = await makeTestApp({ signInBurst: 1000 });
  const [surveyor, safety, planner] = await Promise.all([t.as('surveyor'), t.as('safety'), t.as('planner')]);
  const lineId = (await buildLine(surveyor, 2)).line.id;
  let row = 0;
  const submitted = async (over: Record<string, unknown> = {}) => {
    const lat = -30.3 - row++ * 0.01;
    const ids: string[] = [];
    for (const k of [0, 1]) {
      const r = await surveyor.post('/api/structures', { lineId, lat, lon: -130.45 + k * 0.002, kind: 'pole', attachmentHeightM: 13 });
      expect(r.status).toBe(201);
      ids.push(r.body.id);
    }
    const created = await surveyor.post('/api/spans', { ...completeSpan(lineId, ids[0]!, ids[1]!), ...over });
    expect(created.status).toBe(201);
    expect((await surveyor.post(`/api/spans/${created.body.id}/submit`)).status).toBe(200);
    return { id: created.body.id as string, lat };
  };
  return { t, surveyor, safety, planner, lineId, submitted };
}
