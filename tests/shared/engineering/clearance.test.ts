import { describe, it, expect } from 'vitest';
import {
  oshaApproachDistanceFt,
  approachDistanceM,
  nescGroundClearanceFt,
  codeGroundClearanceM,
  voltageToGroundKv,
} from '../../../shared/engineering/clearance.ts';

describe('OSHA 29 CFR 1910.333(c)(3) approach distance', () => {
  it('when 80 kV to ground, then 11 ft', () => {
    expect(oshaApproachDistanceFt(80)).toBeCloseTo(11, 10); // OSHA 29 CFR 1910.333(c)(3)
  });

  it('when at or below 50 kV to ground, then 10 ft', () => {
    expect(oshaApproachDistanceFt(50)).toBe(10); // OSHA 29 CFR 1910.333(c)(3)
    expect(oshaApproachDistanceFt(7.2)).toBe(10); // OSHA 29 CFR 1910.333(c)(3)
  });

  it('when a 10 kV step is started, then the full 4 in is added (chosen rounding)', () => {
    expect(oshaApproachDistanceFt(51)).toBeCloseTo(10 + 4 / 12, 10); // OSHA 29 CFR 1910.333(c)(3), each started 10 kV
    expect(oshaApproachDistanceFt(70)).toBeCloseTo(10 + 8 / 12, 10); // OSHA 29 CFR 1910.333(c)(3)
  });

  it('when given 138 kV line-to-line, then it uses 79.7 kV to ground → 11 ft = 3.353 m', () => {
    expect(voltageToGroundKv(138)).toBeCloseTo(79.67, 2); // direct computation, V/√3
    expect(approachDistanceM(138)).toBeCloseTo(11 * 0.3048, 6); // OSHA 29 CFR 1910.333(c)(3)
  });
});

describe('NESC Table 232-1 ground clearance', () => {
  it('when ≤ 22 kV to ground, then 18.5 ft', () => {
    expect(nescGroundClearanceFt(7.2)).toBe(18.5); // NESC (ANSI C2) Table 232-1
    expect(codeGroundClearanceM(12.47)).toBeCloseTo(18.5 * 0.3048, 9); // NESC (ANSI C2) Table 232-1
  });

  it('when above 22 kV, then 0.4 in per kV over 22 is added', () => {
    expect(nescGroundClearanceFt(72)).toBeCloseTo(18.5 + (50 * 0.4) / 12, 9); // NESC (ANSI C2) Rule 232 adder, from memory
  });
});
