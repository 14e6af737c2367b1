import { describe, it, expect } from 'vitest';
import { chargeTimeS, chargeTimeMin } from '../../../shared/engineering/charge-time.ts';

describe('charge time t = ΔSOC·E/(P·η_conv·η_batt)', () => {
  it('when 80 % of 100 Wh is restored at 100 W with η 0.9 × 0.95, then about 56 min', () => {
    const min = chargeTimeMin({ deltaSoc: 0.8, batteryWh: 100, harvestW: 100, converterEfficiency: 0.9, batteryEfficiency: 0.95 });
    expect(min).toBeCloseTo((0.8 * 100 * 60) / (100 * 0.9 * 0.95), 9); // direct computation (energy balance)
    expect(min).toBeGreaterThan(55);
    expect(min).toBeLessThan(57);
  });

  it('when the power halves, then the time doubles', () => {
    const a = chargeTimeS({ deltaSoc: 0.5, batteryWh: 200, harvestW: 80, converterEfficiency: 0.9 });
    const b = chargeTimeS({ deltaSoc: 0.5, batteryWh: 200, harvestW: 40, converterEfficiency: 0.9 });
    expect(b / a).toBeCloseTo(2, 12); // direct computation
  });

  it('when nothing is harvested, then the time is infinite', () => {
    expect(chargeTimeS({ deltaSoc: 0.8, batteryWh: 100, harvestW: 0, converterEfficiency: 0.9 })).toBe(Infinity); // direct computation
  });
});
