import { describe, it, expect } from 'vitest';
import { fluxDensityT, enclosedCurrentA, MU0_H_PER_M } from '../../../shared/engineering/ampere.ts';

describe('Ampère flux density B = μ0·I/(2πr)', () => {
  it('when 100 A flows, then 1 m away B is 20.0 µT', () => {
    expect(fluxDensityT(100, 1) * 1e6).toBeCloseTo(20.0, 3); // direct computation
  });

  it('when 1000 A flows, then 3 cm away B is 6.667 mT', () => {
    expect(fluxDensityT(1000, 0.03) * 1e3).toBeCloseTo(6.667, 3); // direct computation
  });

  it('when distance doubles, then the field halves', () => {
    expect(fluxDensityT(500, 0.2) / fluxDensityT(500, 0.4)).toBeCloseTo(2, 12); // direct computation (B ∝ 1/r)
  });

  it('uses μ0 = 4π×10⁻⁷ H/m and rejects a non-positive distance', () => {
    expect(MU0_H_PER_M).toBeCloseTo(1.25663706e-6, 13); // direct computation
    expect(() => fluxDensityT(100, 0)).toThrow(RangeError);
  });

  it('when a phase is a bundle, then the core encloses one sub-conductor, I/n', () => {
    expect(enclosedCurrentA(1200, 4)).toBe(300); // direct computation (Ampère: enclosed current only)
  });
});
