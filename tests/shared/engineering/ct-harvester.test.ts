import { describe, it, expect } from 'vitest';
import {
  harvest,
  harvestCurve,
  harvestPowerW,
  linearLoadPowerW,
  magnetisingInductanceH,
  optimalLoadOhm,
  saturationOnsetCurrentA,
  saturationVoltageRmsV,
  type HarvesterCore,
} from '../../../shared/engineering/ct-harvester.ts';
import { MU0_H_PER_M } from '../../../shared/engineering/ampere.ts';

const core: HarvesterCore = {
  turns: 200,
  coreAreaMm2: 300,
  pathLengthMm: 200,
  relativePermeability: 5000,
  airGapMm: 0.1,
  saturationT: 1.8,
  windingResistanceOhm: 0.5,
};
const f = 60;

describe('CT harvester magnetic-circuit model', () => {
  it('computes L_m = μ0·N²·Aₑ/(lₑ/μᵣ + l_g)', () => {
    const expected = (MU0_H_PER_M * 200 ** 2 * 300e-6) / (0.2 / 5000 + 0.1e-3);
    expect(magnetisingInductanceH(core)).toBeCloseTo(expected, 12); // direct computation (magnetic-circuit theory)
  });

  it('when R_w = 0, then P_max is independent of N and equals Iₚ²·ω·μ0·Aₑ/(2·(lₑ/μᵣ + l_g))', () => {
    const ideal = { ...core, windingResistanceOhm: 0, saturationT: 100 };
    const pmax = (20 ** 2 * 2 * Math.PI * f * MU0_H_PER_M * 300e-6) / (2 * (0.2 / 5000 + 0.1e-3));
    for (const turns of [50, 200, 1000]) {
      const r = harvest({ currentA: 20, frequencyHz: f, harvester: { ...ideal, turns } });
      expect(r.powerW).toBeCloseTo(pmax, 9); // direct computation (CT self-consistency)
      expect(r.saturated).toBe(false);
    }
  });

  it('puts the optimum at R_opt = √(R_w² + X²) below saturation', () => {
    const rOpt = optimalLoadOhm(core, f);
    const r = harvest({ currentA: 10, frequencyHz: f, harvester: core });
    expect(r.optimalLoadOhm).toBeCloseTo(rOpt, 9);
    for (const k of [0.8, 0.95, 1.05, 1.25]) {
      expect(linearLoadPowerW(10, f, core, rOpt * k)).toBeLessThan(r.powerW); // direct computation (maximum-power transfer)
    }
  });

  it('at R_opt with R_w = 0 the peak flux is μ0·Iₚ/(lₑ/μᵣ + l_g)', () => {
    const ideal = { ...core, windingResistanceOhm: 0, saturationT: 100 };
    const r = harvest({ currentA: 10, frequencyHz: f, harvester: ideal });
    expect(r.peakFluxDensityT).toBeCloseTo((MU0_H_PER_M * 10) / (0.2 / 5000 + 0.1e-3), 9); // direct computation
  });

  it('when current doubles below saturation, then power quadruples (P ∝ I²)', () => {
    const onset = saturationOnsetCurrentA(core, f);
    const a = harvest({ currentA: onset / 4, frequencyHz: f, harvester: core });
    const b = harvest({ currentA: onset / 2, frequencyHz: f, harvester: core });
    expect(a.saturated || b.saturated).toBe(false);
    expect(b.powerW / a.powerW).toBeCloseTo(4, 6); // direct computation (CT self-consistency)
  });

  it('when current doubles well above saturation, then power roughly doubles (P ∝ I)', () => {
    const ideal = { ...core, windingResistanceOhm: 0 };
    const onset = saturationOnsetCurrentA(ideal, f);
    const a = harvest({ currentA: onset * 10, frequencyHz: f, harvester: ideal });
    const b = harvest({ currentA: onset * 20, frequencyHz: f, harvester: ideal });
    expect(a.saturated && b.saturated).toBe(true);
    const ratio = b.powerW / a.powerW;
    expect(ratio).toBeGreaterThan(1.95); // direct computation (CT self-consistency)
    expect(ratio).toBeLessThan(2.05);
    // Ceiling ≈ 4.44·f·Aₑ·B_sat·Iₚ for sinusoidal flux (direct computation from the saturation bound).
    const ceilingW = 4.4429 * f * 300e-6 * 1.8 * onset * 20;
    expect(b.powerW).toBeLessThanOrEqual(ceilingW);
    expect(b.powerW).toBeGreaterThan(0.99 * ceilingW);
  });

  it('when the winding has resistance, then saturated power grows less than linearly (copper loss ∝ I²)', () => {
    const onset = saturationOnsetCurrentA(core, f);
    const a = harvest({ currentA: onset * 10, frequencyHz: f, harvester: core }).powerW;
    const b = harvest({ currentA: onset * 20, frequencyHz: f, harvester: core }).powerW;
    expect(b).toBeGreaterThan(a); // direct computation
    expect(b / a).toBeLessThan(2);
  });

  it('when saturated without a given load, then no other load does better under the bound', () => {
    const current = saturationOnsetCurrentA(core, f) * 5;
    const best = harvest({ currentA: current, frequencyHz: f, harvester: core });
    expect(best.saturated).toBe(true);
    expect(best.peakFluxDensityT).toBeCloseTo(1.8, 6); // direct computation: the core sits at B_sat
    const rOpt = optimalLoadOhm(core, f);
    let scanBest = 0;
    for (let i = 1; i <= 4000; i++) {
      const p = harvest({ currentA: current, frequencyHz: f, harvester: core, loadOhm: (rOpt * 2 * i) / 4000 }).powerW;
      scanBest = Math.max(scanBest, p);
    }
    expect(best.powerW).toBeGreaterThanOrEqual(scanBest * (1 - 1e-9)); // direct computation (brute-force scan)
    expect(best.powerW).toBeLessThan(scanBest * 1.001);
    expect(best.optimalLoadOhm).toBeLessThan(rOpt);
  });

  it('when a load would push the core past B_sat, then the voltage clamps to 4.44·f·N·Aₑ·B_sat', () => {
    const vSat = saturationVoltageRmsV(core, f);
    expect(vSat).toBeCloseTo(4.4429 * f * 200 * 300e-6 * 1.8, 2); // transformer EMF equation (direct computation)
    const loadOhm = 200;
    const r = harvest({ currentA: 800, frequencyHz: f, harvester: core, loadOhm });
    expect(r.saturated).toBe(true);
    const vm = (r.loadVoltageRmsV * (loadOhm + 0.5)) / loadOhm;
    expect(vm).toBeCloseTo(vSat, 9);
    expect(r.powerW).toBeCloseTo(r.loadVoltageRmsV ** 2 / loadOhm, 9); // direct computation (P = V²/R)
    expect(r.peakFluxDensityT).toBeCloseTo(1.8, 9);
  });

  it('when the load is small enough to stay linear, then the given-load result follows the circuit formula', () => {
    const r = harvest({ currentA: 100, frequencyHz: f, harvester: core, loadOhm: 1 });
    expect(r.saturated).toBe(false);
    expect(r.powerW).toBeCloseTo(linearLoadPowerW(100, f, core, 1), 9); // direct computation
  });

  it('when the core is opened (very large gap), then power collapses by orders of magnitude', () => {
    const closed = harvest({ currentA: 300, frequencyHz: f, harvester: core }).powerW;
    const open = harvest({ currentA: 300, frequencyHz: f, harvester: { ...core, airGapMm: 50 } }).powerW;
    expect(open).toBeLessThan(closed / 100); // direct computation (magnetic-circuit model)
  });

  it('applies converter efficiency and draws a curve with the saturation onset', () => {
    const profile = { ...core, converterEfficiency: 0.9 };
    expect(harvestPowerW(profile, 300, f)).toBeCloseTo(0.9 * harvest({ currentA: 300, frequencyHz: f, harvester: core }).powerW, 9);
    const curve = harvestCurve(profile, f, 1000, 20);
    expect(curve.points).toHaveLength(21);
    expect(curve.points[0]!.powerW).toBe(0);
    for (let i = 1; i < curve.points.length; i++) expect(curve.points[i]!.powerW).toBeGreaterThan(curve.points[i - 1]!.powerW);
    const firstSaturated = curve.points.find((p) => p.saturated)!;
    expect(firstSaturated.currentA).toBeGreaterThanOrEqual(curve.saturationOnsetA);
    expect(curve.points.filter((p) => p.currentA < curve.saturationOnsetA).every((p) => !p.saturated)).toBe(true);
  });
});
