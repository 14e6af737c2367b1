// Calculators any signed-in user can run: the same pure methods the assessment uses, on inputs of their own.
import { benchTestCalcSchema, conductorThermalCalcSchema, harvestCalcSchema } from '#shared/schemas/calc.ts';
import type { BenchTestCalcResult, ConductorThermalCalcResult, HarvestCalcResult } from '#shared/schemas/calc.ts';
import { harvest } from '#shared/engineering/ct-harvester.ts';
import { conductorThermal } from '#shared/engineering/ieee738.ts';
import { benchTest } from '#shared/engineering/bench-test.ts';
import { featureRouter } from '../../http/access.ts';
import { AppError, parse } from '../../http/errors.ts';

/** A result with a non-finite number means the inputs sit outside what the method can answer: a 400, not a 500. */
function finiteOr400<T extends object>(result: T, field: string): T {
  const bad = (v: unknown): boolean =>
    typeof v === 'number' ? !Number.isFinite(v) : v !== null && typeof v === 'object' ? Object.values(v).some(bad) : false;
  if (bad(result)) throw AppError.field(field, 'These inputs give no finite result; check the values');
  return result;
}

export function calcRouter() {
  const r = featureRouter('/api/calc');

  r.post('/harvest', 'signed-in', (req, res) => {
    const input = parse(harvestCalcSchema, req.body);
    const result: HarvestCalcResult = harvest(input);
    res.json(finiteOr400(result, 'harvester'));
  });

  r.post('/conductor-thermal', 'signed-in', (req, res) => {
    const input = parse(conductorThermalCalcSchema, req.body);
    const result: ConductorThermalCalcResult = conductorThermal(input);
    res.json(finiteOr400(result, 'conductor'));
  });

  r.post('/bench-test', 'signed-in', (req, res) => {
    const input = parse(benchTestCalcSchema, req.body);
    const result: BenchTestCalcResult = benchTest(input);
    res.json(finiteOr400(result, 'loadOhm'));
  });

  return r.router;
}
