// Test data for the assessment tests: a line with structures and spans written straight through the ORM.
import type { MikroORM } from '@mikro-orm/sqlite';
import { Line } from '../../server/modules/inventory/line.entity.ts';
import { Structure } from '../../server/modules/inventory/structure.entity.ts';
import { Span } from '../../server/modules/inventory/span.entity.ts';
import { Hazard } from '../../server/modules/inventory/hazard.entity.ts';
import { notifySpanChanged } from '../../server/modules/inventory/inventory.service.ts';
import { findConductor } from '../../shared/engineering/conductors.ts';
import type { Client } from './helpers.ts';

let seq = 0;
const nextId = (prefix: string) => `${prefix}-${++seq}-${Math.random().toString(36).slice(2, 8)}`;

/** A 24-hour profile around the typical load: low at night, high in the evening. */
export const DAILY_PROFILE_A = Array.from({ length: 24 }, (_, h) => Math.round(700 + 200 * Math.sin(((h - 12) / 24) * 2 * Math.PI)));

export async function makeLine(orm: MikroORM, over: Partial<Line> = {}) {
  const em = orm.em.fork();
  const now = new Date();
  const line = em.create(Line, {
    id: nextId('line'),
    name: `Test line ${seq}`,
    owner: 'Harrow Vale Power Cooperative',
    voltageKv: 138,
    frequencyHz: 60,
    phases: 3,
    loadTypicalA: 700,
    loadMinA: 400,
    loadPeakA: 900,
    loadProfileA: DAILY_PROFILE_A,
    version: 1,
    createdAt: now,
    updatedAt: now,
    ...over,
  });
  await em.flush();
  return line;
}

export interface SpanOpts {
  codeWord?: string | null;
  diameterMm?: number | null;
  clearanceM?: number | null;
  loadCurrentA?: number | null;
  hazards?: ('low' | 'medium' | 'high')[];
  /** Position of the span's from-structure; the span runs ~300 m east. */
  lon?: number;
  lat?: number;
  notify?: boolean;
}

/** A fully surveyed span (Drake, 15 m clearance, surveyed today) that the demo profiles can perch on. */
export async function makeSpan(orm: MikroORM, line: Line, opts: SpanOpts = {}) {
  const em = orm.em.fork();
  const now = new Date();
  const lat = opts.lat ?? -30.2;
  const lon = opts.lon ?? -130.3;
  const mk = (label: string, lo: number) =>
    em.create(Structure, { id: nextId('st'), lineId: line.id, lat, lon: lo, kind: 'tower', label, attachmentHeightM: 24, version: 1, createdAt: now, updatedAt: now });
  const from = mk(`T-${seq}a`, lon);
  const to = mk(`T-${seq}b`, lon + 0.0031);
  const code = opts.codeWord === undefined ? 'Drake' : opts.codeWord;
  const c = code ? findConductor(code) : undefined;
  const span = em.create(Span, {
    id: nextId('span'),
    lineId: line.id,
    fromStructureId: from.id,
    toStructureId: to.id,
    status: 'draft',
    version: 1,
    lengthM: 299,
    conductorCodeWord: c?.codeWord ?? null,
    conductorSize: c?.size ?? null,
    conductorMaterial: 'ACSR',
    conductorDiameterMm: opts.diameterMm === undefined ? (c?.diameterMm ?? null) : opts.diameterMm,
    conductorResistanceLowOhmPerM: c?.resistanceAc25OhmPerM ?? null,
    conductorTempLowC: c ? 25 : null,
    conductorResistanceHighOhmPerM: c?.resistanceAc75OhmPerM ?? null,
    conductorTempHighC: c ? 75 : null,
    phasePosition: 'top',
    clearanceM: opts.clearanceM === undefined ? 15 : opts.clearanceM,
    lowestClearanceM: 12,
    terrain: 'open-field',
    loadCurrentA: opts.loadCurrentA ?? null,
    surveyDate: now.toISOString().slice(0, 10),
    surveyorId: null,
    returnReason: null,
    suspendReason: null,
    submittedAt: null,
    approvedAt: null,
    approvedById: null,
    createdAt: now,
    updatedAt: now,
  });
  for (const severity of opts.hazards ?? []) {
    em.create(Hazard, { id: nextId('hz'), spanId: span.id, kindId: 'vegetation', severity, positionAlongM: null, note: '', createdAt: now });
  }
  await em.flush();
  if (opts.notify !== false) await notifySpanChanged(em, { action: 'create', spanIds: [span.id] });
  return span;
}

/** Polls a job until it has finished; returns every progress reading seen. */
export async function waitForJob(client: Client, jobId: string, timeoutMs = 15_000) {
  const seen: { state: string; done: number; total: number }[] = [];
  const start = Date.now();
  for (;;) {
    const res = await client.get(`/api/jobs/${jobId}`);
    if (res.status !== 200) throw new Error(`job ${jobId}: ${res.status}`);
    seen.push({ state: res.body.state, done: res.body.done, total: res.body.total });
    if (res.body.state === 'done' || res.body.state === 'failed') return { job: res.body, seen };
    if (Date.now() - start > timeoutMs) throw new Error(`job ${jobId} still ${res.body.state} after ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 20));
  }
}

/** Waits until every job the app knows has finished. */
export async function waitForAllJobs(client: Client) {
  for (let i = 0; i < 500; i++) {
    const res = await client.get('/api/jobs');
    if (res.body.items.every((j: { state: string }) => j.state === 'done' || j.state === 'failed')) return res.body.items;
    await new Promise((r) => setTimeout(r, 20));
  }
  throw new Error('jobs did not finish');
}
