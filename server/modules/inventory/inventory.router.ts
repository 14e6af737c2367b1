// HTTP routes of the line inventory: lines, structures, spans (with the review lifecycle), hazard kinds, conductors.
import express, { type ErrorRequestHandler } from 'express';
import { OptimisticLockError } from '@mikro-orm/core';
import {
  hazardKindCreateSchema,
  hazardKindUpdateSchema,
  lineCreateSchema,
  lineUpdateSchema,
  spanCreateSchema,
  spanListQuerySchema,
  spanReasonTransitionSchema,
  spanTransitionSchema,
  spanUpdateSchema,
  structureCreateSchema,
  structureListQuerySchema,
  structureUpdateSchema,
} from '#shared/schemas/inventory.ts';
import type { AppContext } from '../../context.ts';
import { currentUser, featureRouter } from '../../http/access.ts';
import { AppError, errorBody, parse } from '../../http/errors.ts';
import { audit } from '../audit/audit.service.ts';
import { ConductorType } from './conductor-type.entity.ts';
import { HazardKind } from './hazard-kind.entity.ts';
import { Line } from './line.entity.ts';
import { Structure } from './structure.entity.ts';
import { Span } from './span.entity.ts';
import { StaleVersionError, conductorCatalogueView, hazardKindView, lineView, spanViewOf, structureView } from './inventory.service.ts';
import { createLine, createStructure, lineCounts, updateLine, updateStructure } from './lines.service.ts';
import { createSpan, getSpanOr404, transitionSpan, updateSpan, type TransitionName } from './spans.service.ts';
import { listSpansJson } from './spans.query.ts';
import { importExportRouter } from '../import-export/import-export.router.ts';
import { assessmentReady } from '../assessment/rescore.ts';

/** Stale versions answer 409 with the saved record in `error.current`, so the client can show both versions. */
export const staleVersionHandler: ErrorRequestHandler = async (err, req, res, next) => {
  if (err instanceof StaleVersionError) {
    res.status(409).json({ error: { ...errorBody(err.code, err.message, err.issues).error, current: err.current } });
    return;
  }
  if (err instanceof OptimisticLockError) {
    // Two saves of the same version raced and this one lost at the database: answer like any stale write.
    const entity = (err as OptimisticLockError & { entity?: unknown }).entity;
    const em = req.em.fork();
    let current: unknown = null;
    if (entity instanceof Span) {
      const saved = await em.findOne(Span, { id: entity.id });
      if (saved) current = await spanViewOf(em, saved);
    } else if (entity instanceof Structure) {
      const saved = await em.findOne(Structure, { id: entity.id });
      if (saved) current = structureView(saved);
    } else if (entity instanceof Line) {
      const saved = await em.findOne(Line, { id: entity.id });
      if (saved) current = lineView(saved);
    }
    const body = errorBody('conflict', 'This record was changed by someone else at the same moment. Your change was not saved; compare it with the saved one and apply it again.');
    res.status(409).json({ error: { ...body.error, current } });
    return;
  }
  next(err);
};

/** Mounted at /api: lines, structures, spans, hazard-kinds, conductors. */
export function inventoryRouter(ctx: AppContext) {
  const root = express.Router();
  // Import and export first: /spans/export.csv must not be taken for a span id.
  root.use(importExportRouter(ctx));

  // ---------- lines ----------
  const lines = featureRouter('/api/lines');
  lines.get('/', 'signed-in', async (req, res) => {
    const [all, counts] = await Promise.all([req.em.find(Line, {}, { orderBy: { voltageKv: 'desc', name: 'asc' } }), lineCounts(req.em)]);
    res.json({ items: all.map((l) => lineView(l, counts.get(l.id) ?? { structureCount: 0, spanCount: 0 })) });
  });
  lines.get('/:id', 'signed-in', async (req, res) => {
    const line = await req.em.findOne(Line, { id: String(req.params.id) });
    if (!line) throw AppError.notFound('Line');
    res.json(lineView(line, (await lineCounts(req.em)).get(line.id) ?? { structureCount: 0, spanCount: 0 }));
  });
  lines.post('/', ['surveyor', 'admin'], async (req, res) => {
    res.status(201).json(await createLine(req.em, currentUser(req), parse(lineCreateSchema, req.body)));
  });
  lines.patch('/:id', ['surveyor', 'admin'], async (req, res) => {
    res.json(await updateLine(req.em, currentUser(req), String(req.params.id), parse(lineUpdateSchema, req.body)));
  });

  // ---------- structures ----------
  const structures = featureRouter('/api/structures');
  structures.get('/', 'signed-in', async (req, res) => {
    const { lineId } = parse(structureListQuerySchema, req.query);
    const items = await req.em.find(Structure, lineId ? { lineId } : {}, { orderBy: { lineId: 'asc', label: 'asc' } });
    res.json({ items: items.map(structureView) });
  });
  structures.get('/:id', 'signed-in', async (req, res) => {
    const s = await req.em.findOne(Structure, { id: String(req.params.id) });
    if (!s) throw AppError.notFound('Structure');
    res.json(structureView(s));
  });
  structures.post('/', ['surveyor'], async (req, res) => {
    res.status(201).json(await createStructure(req.em, currentUser(req), parse(structureCreateSchema, req.body)));
  });
  structures.patch('/:id', ['surveyor'], async (req, res) => {
    const { structure, spanIds } = await updateStructure(req.em, currentUser(req), String(req.params.id), parse(structureUpdateSchema, req.body));
    res.json({ ...structure, updatedSpanIds: spanIds });
  });

  // ---------- spans ----------
  const spans = featureRouter('/api/spans');
  spans.get('/', 'signed-in', async (req, res) => {
    const q = parse(spanListQuerySchema, req.query);
    const user = currentUser(req);
    // The app's ETag function (Express's 'etag fn' setting; none when ETags are off), applied once per cached page.
    const etagFn = req.app.get('etag fn') as ((body: Buffer, encoding?: string) => string | undefined) | undefined;
    const page = await listSpansJson(
      req.em,
      {
        status: q.status,
        lineId: q.lineId || undefined,
        surveyorId: q.mine ? user.id : q.surveyorId || undefined,
        q: q.q || undefined,
        minHarvestW: q.minHarvestW,
        minScore: q.minScore,
        perchable: q.perchable,
        sort: q.sort,
        page: q.page,
        pageSize: q.pageSize,
      },
      typeof etagFn === 'function' ? (body) => etagFn(body) : undefined,
    );
    if (page.etag) res.set('ETag', page.etag);
    res.type('application/json').send(page.body);
  });
  spans.get('/:id', 'signed-in', async (req, res) => {
    res.json(await spanViewOf(req.em, await getSpanOr404(req.em, String(req.params.id))));
  });
  spans.post('/', ['surveyor'], async (req, res) => {
    res.status(201).json(await createSpan(req.em, currentUser(req), parse(spanCreateSchema, req.body)));
  });
  spans.patch('/:id', ['surveyor'], async (req, res) => {
    res.json(await updateSpan(req.em, currentUser(req), String(req.params.id), parse(spanUpdateSchema, req.body)));
  });
  const transition = (name: TransitionName, needsReason: boolean) => async (req: express.Request, res: express.Response) => {
    const input = needsReason ? parse(spanReasonTransitionSchema, req.body) : parse(spanTransitionSchema, req.body);
    // Approval judges a fresh assessment, which needs the default profiles in place.
    if (name === 'approve' || name === 'reinstate') await assessmentReady(ctx);
    res.json(await transitionSpan(req.em, currentUser(req), String(req.params.id), name, input));
  };
  spans.post('/:id/submit', ['surveyor'], transition('submit', false));
  spans.post('/:id/approve', ['safety'], transition('approve', false));
  spans.post('/:id/return', ['safety'], transition('return', true));
  spans.post('/:id/suspend', ['safety'], transition('suspend', true));
  spans.post('/:id/reinstate', ['safety'], transition('reinstate', false));

  // ---------- hazard kinds (the safety role's catalogue) ----------
  const kinds = featureRouter('/api/hazard-kinds');
  kinds.get('/', 'signed-in', async (req, res) => {
    const items = await req.em.find(HazardKind, {}, { orderBy: { label: 'asc' } });
    res.json({ items: items.map(hazardKindView) });
  });
  kinds.post('/', ['safety'], async (req, res) => {
    const input = parse(hazardKindCreateSchema, req.body);
    if (await req.em.findOne(HazardKind, { id: input.id })) throw AppError.field('id', 'A hazard kind with this id already exists');
    const kind = req.em.create(HazardKind, input);
    audit(req.em, { actorId: currentUser(req).id, action: 'hazard-kind.create', recordType: 'hazard-kind', recordId: kind.id, before: null, after: hazardKindView(kind) });
    await req.em.flush();
    res.status(201).json(hazardKindView(kind));
  });
  kinds.patch('/:id', ['safety'], async (req, res) => {
    const input = parse(hazardKindUpdateSchema, req.body);
    const kind = await req.em.findOne(HazardKind, { id: String(req.params.id) });
    if (!kind) throw AppError.notFound('Hazard kind');
    const before = hazardKindView(kind);
    Object.assign(kind, Object.fromEntries(Object.entries(input).filter(([, v]) => v !== undefined)));
    audit(req.em, { actorId: currentUser(req).id, action: 'hazard-kind.update', recordType: 'hazard-kind', recordId: kind.id, before, after: hazardKindView(kind) });
    await req.em.flush();
    res.json(hazardKindView(kind));
  });

  // ---------- conductor catalogue ----------
  const conductors = featureRouter('/api/conductors');
  conductors.get('/', 'signed-in', async (req, res) => {
    const items = await req.em.find(ConductorType, {}, { orderBy: { diameterMm: 'asc' } });
    res.json({ items: items.map(conductorCatalogueView) });
  });

  root.use('/lines', lines.router);
  root.use('/structures', structures.router);
  root.use('/spans', spans.router);
  root.use('/hazard-kinds', kinds.router);
  root.use('/conductors', conductors.router);
  root.use(staleVersionHandler);
  return root;
}
