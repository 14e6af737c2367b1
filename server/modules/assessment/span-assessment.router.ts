// Per-span assessment reads: every stored pair, and the harvest curves the span page charts.
import { z } from 'zod';
import type { AppContext } from '../../context.ts';
import { featureRouter } from '../../http/access.ts';
import { parse } from '../../http/errors.ts';
import { assessmentsOfSpan, harvestCurveOfSpan } from './assessment.service.ts';
import { waitForAssessmentDefaults } from './rescore.ts';

const curveQuery = z.object({ harvesterId: z.string().trim().min(1).max(64).optional() });

export function spanAssessmentRouter(ctx: AppContext) {
  const r = featureRouter('/api/spans');
  const wait = waitForAssessmentDefaults(ctx);

  r.get('/:id/assessments', 'signed-in', wait, async (req, res) => {
    res.json({ items: await assessmentsOfSpan(req.em, String(req.params.id)) });
  });

  r.get('/:id/harvest-curve', 'signed-in', wait, async (req, res) => {
    const { harvesterId } = parse(curveQuery, req.query);
    res.json(await harvestCurveOfSpan(req.em, String(req.params.id), harvesterId));
  });

  return r.router;
}
