// Perch missions (api.md "Missions"): planners plan and save, safety authorises, every role reads.
import type { EntityManager } from '@mikro-orm/core';
import type { AppContext } from '../../context.ts';
import { currentUser, featureRouter } from '../../http/access.ts';
import { parse } from '../../http/errors.ts';
import { missionAuthoriseSchema, missionCreateSchema, missionReplanSchema, planRequestSchema } from '#shared/schemas/missions.ts';
import { waitForAssessmentDefaults } from '../assessment/rescore.ts';
import { registerAssessedListener } from '../assessment/assessment.service.ts';
import { registerZoneListener } from '../zones/zone.service.ts';
import { planContext, planMission } from './plan.service.ts';
import { authoriseMission, createMission, getMission, listMissions, missionHistory, missionsOnSpans, refreshStaleness, replanMission, viewOf } from './missions.service.ts';

/** Marks missions whose plan no longer holds when the spans they perch on are reassessed or a zone changes. */
function stalenessHooks(ctx: AppContext) {
  const mine = (em: EntityManager) => em.getDriver() === ctx.orm.em.getDriver();
  const offAssessed = registerAssessedListener(async (em, spanIds) => {
    if (!mine(em)) return;
    const ids = await missionsOnSpans(em, spanIds);
    if (ids.length) await refreshStaleness(em, ids);
  });
  const offZone = registerZoneListener(async (em) => {
    if (!mine(em)) return;
    await refreshStaleness(em);
  });
  ctx.onClose(() => {
    offAssessed();
    offZone();
  });
}

export function missionsRouter(ctx: AppContext) {
  stalenessHooks(ctx);
  const r = featureRouter('/api/missions');
  r.router.use(waitForAssessmentDefaults(ctx));

  r.post('/plan', ['planner'], async (req, res) => {
    const input = parse(planRequestSchema, req.body);
    const pc = await planContext(req.em, input);
    const { result } = await planMission(req.em, input, pc);
    res.json(result);
  });

  r.get('/', 'signed-in', async (req, res) => {
    res.json({ items: await listMissions(req.em) });
  });

  r.post('/', ['planner'], async (req, res) => {
    const input = parse(missionCreateSchema, req.body);
    res.status(201).json(await createMission(req.em, currentUser(req), input));
  });

  r.get('/:id', 'signed-in', async (req, res) => {
    res.json(await viewOf(req.em, await getMission(req.em, String(req.params.id))));
  });

  r.get('/:id/history', 'signed-in', async (req, res) => {
    res.json({ items: await missionHistory(req.em, String(req.params.id)) });
  });

  r.post('/:id/replan', ['planner'], async (req, res) => {
    const input = parse(missionReplanSchema, req.body);
    res.json(await replanMission(req.em, currentUser(req), String(req.params.id), input));
  });

  r.post('/:id/authorise', ['safety'], async (req, res) => {
    const input = parse(missionAuthoriseSchema, req.body);
    res.json(await authoriseMission(req.em, currentUser(req), String(req.params.id), input.version));
  });

  return r.router;
}
