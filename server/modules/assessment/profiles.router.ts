// Harvester and drone profiles (admins keep them, everyone reads them), bench tests and the gap fit.
import { generateIdFromEntropySize } from 'lucia';
import type { EntityManager } from '@mikro-orm/core';
import {
  benchTestCreateSchema,
  droneProfileCreateSchema,
  droneProfileUpdateSchema,
  fitGapSchema,
  harvesterProfileCreateSchema,
  harvesterProfileUpdateSchema,
  type FitGapResult,
} from '#shared/schemas/assessment.ts';
import { fitAirGap } from '#shared/engineering/bench-test.ts';
import { benchTest as benchArithmetic } from '#shared/engineering/bench-test.ts';
import type { AppContext } from '../../context.ts';
import { currentUser, featureRouter } from '../../http/access.ts';
import { AppError, parse } from '../../http/errors.ts';
import { audit } from '../audit/audit.service.ts';
import { AuditEntry } from '../audit/audit.entity.ts';
import { Assessment } from './assessment.entity.ts';
import { BenchTest, DroneProfile, HarvesterProfile } from './profile.entity.ts';
import { benchTestView, droneView, harvesterView, profileSnapshot } from './profiles.service.ts';
import { startRescore, waitForAssessmentDefaults } from './rescore.ts';

const ORDER = { orderBy: { sortOrder: 'asc', createdAt: 'asc', id: 'asc' } } as const;

async function harvesterOr404(em: EntityManager, id: string) {
  const p = await em.findOne(HarvesterProfile, { id });
  if (!p) throw AppError.notFound('Harvester profile');
  return p;
}
async function droneOr404(em: EntityManager, id: string) {
  const p = await em.findOne(DroneProfile, { id });
  if (!p) throw AppError.notFound('Drone profile');
  return p;
}
async function nameFree(em: EntityManager, entity: typeof HarvesterProfile | typeof DroneProfile, name: string, selfId?: string) {
  const other = await em.findOne(entity as typeof HarvesterProfile, { name });
  if (other && other.id !== selfId) throw AppError.conflict('Another profile already has this name', [{ path: 'name', message: 'Another profile already has this name' }]);
}
function checkVersion(current: number, given: number) {
  if (current !== given) {
    throw AppError.conflict(`This profile was changed meanwhile (now version ${current}); reload it and apply your edit again`, [
      { path: 'version', message: `Stale version ${given}; the profile is at version ${current}` },
    ]);
  }
}

export function profilesRouter(ctx: AppContext) {
  const r = featureRouter('/api/profiles');
  r.router.use(waitForAssessmentDefaults(ctx));
  const rescore = async (reason: string) => (await startRescore(ctx, reason)).id;

  // ——— harvesters ———
  r.get('/harvesters', 'signed-in', async (req, res) => {
    const items = await req.em.find(HarvesterProfile, {}, ORDER);
    res.json({ items: items.map(harvesterView) });
  });

  r.get('/harvesters/:id', 'signed-in', async (req, res) => {
    res.json(harvesterView(await harvesterOr404(req.em, String(req.params.id))));
  });

  // Every saved version of a profile, newest first (the full record of each is in the audit log).
  r.get('/:kind/:id/history', 'signed-in', async (req, res) => {
    const kind = String(req.params.kind);
    if (kind !== 'harvesters' && kind !== 'drones') throw AppError.notFound('Profile kind');
    const recordType = kind === 'harvesters' ? 'harvester-profile' : 'drone-profile';
    const entries = await req.em.find(AuditEntry, { recordType, recordId: String(req.params.id) }, { orderBy: { id: 'desc' }, limit: 200 });
    if (entries.length === 0) await (kind === 'harvesters' ? harvesterOr404(req.em, String(req.params.id)) : droneOr404(req.em, String(req.params.id)));
    res.json({
      items: entries.map((e) => ({ at: e.at.toISOString(), actorId: e.actorId, action: e.action, version: ((e.after ?? e.before) as { version?: number } | null)?.version ?? null, before: e.before, after: e.after })),
    });
  });

  r.post('/harvesters', ['admin'], async (req, res) => {
    const input = parse(harvesterProfileCreateSchema, req.body);
    await nameFree(req.em, HarvesterProfile, input.name);
    const now = new Date();
    const p = req.em.create(HarvesterProfile, { ...input, id: generateIdFromEntropySize(10), version: 1, createdAt: now, updatedAt: now });
    audit(req.em, { actorId: currentUser(req).id, action: 'harvester-profile.create', recordType: 'harvester-profile', recordId: p.id, after: profileSnapshot(p) });
    await req.em.flush();
    const jobId = p.active ? await rescore(`harvester profile ${p.name} added`) : null;
    res.status(201).json({ ...harvesterView(p), rescoreJobId: jobId });
  });

  r.patch('/harvesters/:id', ['admin'], async (req, res) => {
    const { version, ...changes } = parse(harvesterProfileUpdateSchema, req.body);
    const p = await harvesterOr404(req.em, String(req.params.id));
    checkVersion(p.version, version);
    if (changes.name !== undefined) await nameFree(req.em, HarvesterProfile, changes.name, p.id);
    const min = changes.gripperMinDiameterMm ?? p.gripperMinDiameterMm;
    const max = changes.gripperMaxDiameterMm ?? p.gripperMaxDiameterMm;
    if (max < min) throw AppError.field('gripperMaxDiameterMm', 'The largest gripper diameter must be at least the smallest');
    const before = profileSnapshot(p);
    Object.assign(p, changes, { version: p.version + 1, updatedAt: new Date() });
    audit(req.em, { actorId: currentUser(req).id, action: 'harvester-profile.update', recordType: 'harvester-profile', recordId: p.id, before, after: profileSnapshot(p) });
    await req.em.flush();
    res.json({ ...harvesterView(p), rescoreJobId: await rescore(`harvester profile ${p.name} changed`) });
  });

  r.delete('/harvesters/:id', ['admin'], async (req, res) => {
    const p = await harvesterOr404(req.em, String(req.params.id));
    audit(req.em, { actorId: currentUser(req).id, action: 'harvester-profile.delete', recordType: 'harvester-profile', recordId: p.id, before: profileSnapshot(p) });
    req.em.remove(p);
    await req.em.flush();
    await req.em.nativeDelete(BenchTest, { harvesterProfileId: p.id });
    await req.em.nativeDelete(Assessment, { harvesterProfileId: p.id });
    res.status(204).end();
  });

  // ——— bench tests ———
  r.get('/harvesters/:id/bench-tests', 'signed-in', async (req, res) => {
    const p = await harvesterOr404(req.em, String(req.params.id));
    const tests = await req.em.find(BenchTest, { harvesterProfileId: p.id }, { orderBy: { createdAt: 'asc', id: 'asc' } });
    res.json({ items: tests.map((t) => benchTestView(t, p)) });
  });

  r.post('/harvesters/:id/bench-tests', ['admin'], async (req, res) => {
    const p = await harvesterOr404(req.em, String(req.params.id));
    const input = parse(benchTestCreateSchema, req.body);
    const t = req.em.create(BenchTest, {
      ...input,
      note: input.note ?? null,
      id: generateIdFromEntropySize(10),
      harvesterProfileId: p.id,
      createdById: currentUser(req).id,
      createdAt: new Date(),
    });
    audit(req.em, { actorId: currentUser(req).id, action: 'bench-test.create', recordType: 'bench-test', recordId: t.id, after: { ...input, harvesterProfileId: p.id, ...benchArithmetic(input) } });
    await req.em.flush();
    res.status(201).json(benchTestView(t, p));
  });

  r.delete('/harvesters/:id/bench-tests/:testId', ['admin'], async (req, res) => {
    const t = await req.em.findOne(BenchTest, { id: String(req.params.testId), harvesterProfileId: String(req.params.id) });
    if (!t) throw AppError.notFound('Bench test');
    audit(req.em, { actorId: currentUser(req).id, action: 'bench-test.delete', recordType: 'bench-test', recordId: t.id, before: { ...t } });
    req.em.remove(t);
    await req.em.flush();
    res.status(204).end();
  });

  // Least-squares fit of the effective total gap to the bench points; applying it makes a new profile version.
  r.post('/harvesters/:id/fit-gap', ['admin'], async (req, res) => {
    const { apply, version } = parse(fitGapSchema, req.body);
    const p = await harvesterOr404(req.em, String(req.params.id));
    const tests = await req.em.find(BenchTest, { harvesterProfileId: p.id });
    if (tests.length === 0) throw AppError.badRequest('Record at least one bench test before fitting the gap', [{ path: 'benchTests', message: 'No bench tests yet' }]);
    const points = tests.map((t) => ({ ...benchArithmetic(t), frequencyHz: t.frequencyHz, loadOhm: t.loadOhm })).map((b) => ({
      currentA: b.equivalentLineCurrentA,
      powerW: b.powerW,
      frequencyHz: b.frequencyHz,
      loadOhm: b.loadOhm,
    }));
    const core = { ...p };
    const fit = fitAirGap(core, points);
    const previous = fitAirGap(core, points, { minMm: p.airGapMm, maxMm: p.airGapMm });
    const previousAirGapMm = p.airGapMm;
    let rescoreJobId: string | null = null;
    if (apply) {
      if (version !== undefined) checkVersion(p.version, version);
      const before = profileSnapshot(p);
      p.airGapMm = fit.airGapMm;
      p.version += 1;
      p.updatedAt = new Date();
      audit(req.em, {
        actorId: currentUser(req).id,
        action: 'harvester-profile.fit-gap',
        recordType: 'harvester-profile',
        recordId: p.id,
        before,
        after: { ...profileSnapshot(p), fit: { points: points.length, rmsErrorW: fit.rmsErrorW } },
      });
      await req.em.flush();
      rescoreJobId = await rescore(`air gap of ${p.name} fitted to bench data`);
    }
    const result: FitGapResult & { rescoreJobId: string | null } = {
      airGapMm: fit.airGapMm,
      previousAirGapMm,
      rmsErrorW: fit.rmsErrorW,
      previousRmsErrorW: previous.rmsErrorW,
      points: points.length,
      applied: apply,
      profile: harvesterView(p),
      rescoreJobId,
    };
    res.json(result);
  });

  // ——— drones ———
  r.get('/drones', 'signed-in', async (req, res) => {
    const items = await req.em.find(DroneProfile, {}, ORDER);
    res.json({ items: items.map(droneView) });
  });

  r.get('/drones/:id', 'signed-in', async (req, res) => {
    res.json(droneView(await droneOr404(req.em, String(req.params.id))));
  });

  r.post('/drones', ['admin'], async (req, res) => {
    const input = parse(droneProfileCreateSchema, req.body);
    await nameFree(req.em, DroneProfile, input.name);
    const now = new Date();
    const p = req.em.create(DroneProfile, { ...input, id: generateIdFromEntropySize(10), version: 1, createdAt: now, updatedAt: now });
    audit(req.em, { actorId: currentUser(req).id, action: 'drone-profile.create', recordType: 'drone-profile', recordId: p.id, after: profileSnapshot(p) });
    await req.em.flush();
    const jobId = p.active ? await rescore(`drone profile ${p.name} added`) : null;
    res.status(201).json({ ...droneView(p), rescoreJobId: jobId });
  });

  r.patch('/drones/:id', ['admin'], async (req, res) => {
    const { version, ...changes } = parse(droneProfileUpdateSchema, req.body);
    const p = await droneOr404(req.em, String(req.params.id));
    checkVersion(p.version, version);
    if (changes.name !== undefined) await nameFree(req.em, DroneProfile, changes.name, p.id);
    const before = profileSnapshot(p);
    Object.assign(p, changes, { version: p.version + 1, updatedAt: new Date() });
    audit(req.em, { actorId: currentUser(req).id, action: 'drone-profile.update', recordType: 'drone-profile', recordId: p.id, before, after: profileSnapshot(p) });
    await req.em.flush();
    res.json({ ...droneView(p), rescoreJobId: await rescore(`drone profile ${p.name} changed`) });
  });

  r.delete('/drones/:id', ['admin'], async (req, res) => {
    const p = await droneOr404(req.em, String(req.params.id));
    audit(req.em, { actorId: currentUser(req).id, action: 'drone-profile.delete', recordType: 'drone-profile', recordId: p.id, before: profileSnapshot(p) });
    req.em.remove(p);
    await req.em.flush();
    await req.em.nativeDelete(Assessment, { droneProfileId: p.id });
    res.status(204).end();
  });

  return r.router;
}
