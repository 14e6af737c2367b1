import { describe, it, expect } from 'vitest';
import { harvest, saturationOnsetCurrentA, type HarvesterCore } from '../../../shared/engineering/ct-harvester.ts';
import { impliedCurrentA, impliedCurrentCeiling, PowerAboveCeilingError, IMPLIED_CURRENT_MAX_A } from '../../../shared/engineering/implied-current.ts';

const core: HarvesterCore = { turns: 480, coreAreaMm2: 260, pathLengthMm: 240, relativePermeability: 20_000, airGapMm: 0.05, saturationT: 1.2, windingResistanceOhm: 3.2 };
const f = 60;

describe('line current implied by a measured harvest (inverse of the CT harvester model)', () => {
  it('when a current below saturation gives a power, then inverting that power gives the current back within 0.1 %', () => {
    const onset = saturationOnsetCurrentA(core, f);
    for (const currentA of [onset * 0.1, onset * 0.5, onset * 0.95]) {
      const p = harvest({ currentA, frequencyHz: f, harvester: core }).powerW;
      expect(harvest({ currentA, frequencyHz: f, harvester: core }).saturated).toBe(false);
      // round trip I → P → I (self-consistency of the inversion; the model is the split-core CT of engineering §2)
      expect(Math.abs(impliedCurrentA(core, f, p) - currentA) / currentA).toBeLessThan(0.001);
    }
  });

  it('when a current above saturation gives a power, then inverting it also gives the current back within 0.1 %', () => {
    const onset = saturationOnsetCurrentA(core, f);
    for (const currentA of [onset * 1.5, onset * 4, Math.min(onset * 20, 5000)]) {
      const r = harvest({ currentA, frequencyHz: f, harvester: core });
      expect(r.saturated).toBe(true);
      expect(Math.abs(impliedCurrentA(core, f, r.powerW) - currentA) / currentA).toBeLessThan(0.001);
    }
  });

  it('when the power rises, then the implied current rises (the power–current curve is monotone)', () => {
    let prev = 0;
    for (let i = 1; i <= 40; i++) {
      const p = harvest({ currentA: i * 50, frequencyHz: f, harvester: core }).powerW;
      const c = impliedCurrentA(core, f, p);
      expect(c).toBeGreaterThan(prev);
      prev = c;
    }
  });

  it('when the power is above the model ceiling, then it is refused naming the ceiling', () => {
    const { ceilingW, asymptoteW } = impliedCurrentCeiling(core, f);
    expect(ceilingW).toBeCloseTo(harvest({ currentA: IMPLIED_CURRENT_MAX_A, frequencyHz: f, harvester: core }).powerW, 9);
    // with winding resistance the saturated power tends to V_sat²/(4·R_w) (direct computation from the model's saturated optimum)
    expect(ceilingW).toBeLessThanOrEqual(asymptoteW * (1 + 1e-12));
    expect(() => impliedCurrentA(core, f, ceilingW)).toThrow(PowerAboveCeilingError);
    expect(impliedCurrentA(core, f, ceilingW * 0.98)).toBeGreaterThan(0);
    expect(() => impliedCurrentA(core, f, ceilingW * 1.01)).toThrow(PowerAboveCeilingError);
    try {
      impliedCurrentA(core, f, ceilingW * 1.01);
    } catch (e) {
      expect((e as PowerAboveCeilingError).ceilingW).toBeCloseTo(ceilingW, 9);
    }
  });

  it('when the power is zero, then the implied current is zero; a negative power is refused', () => {
    expect(impliedCurrentA(core, f, 0)).toBe(0);
    expect(() => impliedCurrentA(core, f, -1)).toThrow(RangeError);
  });
});
