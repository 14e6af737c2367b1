// Perch missions (api.md "Missions"): planners plan and save, safety authorises, every role reads.
import type { AppContext } from '../../context.ts';
import { featureRouter } from '../../http/access.ts';
import { parse } from '../../http/errors.ts';
import { planRequestSchema } from '#shared/schemas/missions.ts';
import { waitForAssessmentDefaults } from '../assessment/rescore.ts';
import { planContext, planMission } from './plan.service.ts';

export function missionsRouter(ctx: AppContext) {
  const r = featureRouter('/api/missions');
  r.router.use(waitForAssessmentDefaults(ctx));

  r.post('/plan', ['planner'], async (req, res) => {
    const input = parse(planRequestSchema, req.body);
    const pc = await planContext(req.em, input);
    const { result } = await planMission(req.em, input, pc);
    res.json(result);
  });

  return r.router;
}
