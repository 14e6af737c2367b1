import { describe, it, expect } from 'vitest';
import { benchTest, fitAirGap, type BenchPoint } from '../../../shared/engineering/bench-test.ts';
import { harvest, type HarvesterCore } from '../../../shared/engineering/ct-harvester.ts';

describe('bench test arithmetic', () => {
  it('when a 60-turn fixture carries 11.7 A, then it stands for a 702 A line', () => {
    expect(benchTest({ fixtureTurns: 60, fixtureCurrentA: 11.7, loadVoltageRmsV: 58, loadOhm: 40 }).equivalentLineCurrentA).toBeCloseTo(702, 9); // direct computation (ampere-turns)
  });

  it('when 58 V rms is read across 40 Ω, then about 84 W is delivered', () => {
    const p = benchTest({ fixtureTurns: 60, fixtureCurrentA: 11.7, loadVoltageRmsV: 58, loadOhm: 40 }).powerW;
    expect(p).toBeCloseTo(84.1, 1); // direct computation (P = V²/R)
  });

  it('rejects a non-positive load', () => {
    expect(() => benchTest({ fixtureTurns: 1, fixtureCurrentA: 1, loadVoltageRmsV: 1, loadOhm: 0 })).toThrow(RangeError);
  });
});

describe('fitAirGap', () => {
  const core: HarvesterCore = {
    turns: 400,
    coreAreaMm2: 250,
    pathLengthMm: 190,
    relativePermeability: 8000,
    airGapMm: 1, // deliberately wrong starting value; the fit must ignore it
    saturationT: 1.8,
    windingResistanceOhm: 1.1,
  };
  const synth = (gapMm: number): BenchPoint[] =>
    [
      [20, 100],
      [40, 200],
      [60, 400],
      [80, 60],
    ].map(([currentA, loadOhm]) => ({
      currentA: currentA!,
      frequencyHz: 60,
      loadOhm: loadOhm!,
      powerW: harvest({ currentA: currentA!, frequencyHz: 60, loadOhm, harvester: { ...core, airGapMm: gapMm } }).powerW,
    }));

  it.each([0.03, 0.08, 0.4])('when points come from a %s mm gap, then the fit recovers it', (gapMm) => {
    const fit = fitAirGap(core, synth(gapMm));
    expect(Math.abs(fit.airGapMm - gapMm) / gapMm).toBeLessThan(1e-3); // direct computation (least squares on synthetic data)
    expect(fit.rmsErrorW).toBeLessThan(1e-3);
  });

  it('when measurements are 5 % low, then the fitted gap grows', () => {
    const noisy = synth(0.08).map((p) => ({ ...p, powerW: p.powerW * 0.95 }));
    expect(fitAirGap(core, noisy).airGapMm).toBeGreaterThan(0.08); // direct computation (less power ↔ larger gap)
  });
});
