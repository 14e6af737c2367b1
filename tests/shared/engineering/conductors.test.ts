import { describe, it, expect } from 'vitest';
import { ACSR_CONDUCTORS, findConductor, thermalConductorOf, DEFAULT_EMISSIVITY, DEFAULT_ABSORPTIVITY } from '../../../shared/engineering/conductors.ts';

// Textbook ACSR table values in Ω/1000 ft, converted with Ω/m = Ω/kft ÷ 304.8.
const TABLE: Array<[string, number, number, number, number]> = [
  // code word, OD mm, R_DC20, R_AC25, R_AC75 (Ω/kft)
  ['Penguin', 14.3, 0.0795, 0.0822, 0.116],
  ['Partridge', 16.31, 0.0637, 0.0652, 0.0778],
  ['Linnet', 18.29, 0.0506, 0.0517, 0.0619],
  ['Hawk', 21.79, 0.0357, 0.0366, 0.0438],
  ['Dove', 23.55, 0.0305, 0.0314, 0.0375],
  ['Drake', 28.14, 0.0214, 0.0222, 0.0263],
];
const within = (actual: number, expected: number, relTol: number) =>
  expect(Math.abs(actual - expected) / expected).toBeLessThanOrEqual(relTol);

describe('ACSR catalogue', () => {
  it.each(TABLE)('when %s is looked up, then OD and resistances match the table', (code, od, rdc, r25, r75) => {
    const c = findConductor(code)!;
    expect(c).toBeDefined();
    within(c.diameterMm, od, 0.02); // ASTM B232 / textbook ACSR table, ±2 %
    within(c.resistanceDc20OhmPerM * 304.8, rdc, 0.02); // ASTM B232 / textbook ACSR table, ±2 %
    within(c.resistanceAc25OhmPerM * 304.8, r25, 0.02); // ASTM B232 / textbook ACSR table, ±2 %
    within(c.resistanceAc75OhmPerM * 304.8, r75, 0.02); // ASTM B232 / textbook ACSR table, ±2 %
  });

  it('gives Drake in Ω/m close to the IEEE 738 sample values', () => {
    const drake = findConductor('drake')!;
    within(drake.resistanceAc25OhmPerM, 7.283e-5, 0.02); // IEEE Std 738-2012 sample, ±2 %
    within(drake.resistanceAc75OhmPerM, 8.688e-5, 0.02); // IEEE Std 738-2012 sample, ±2 %
  });

  it('gives Drake weight 1.094 lb/ft = 1.628 kg/m and leaves unread weights undefined', () => {
    within(findConductor('Drake')!.weightKgPerM!, 1.628, 0.002); // Electric Power Engineering Handbook sag-tension table (1.094 lb/ft)
    expect(findConductor('Hawk')!.weightKgPerM).toBeUndefined();
  });

  it('orders sizes so resistance falls as the conductor grows', () => {
    for (let i = 1; i < ACSR_CONDUCTORS.length; i++) {
      expect(ACSR_CONDUCTORS[i]!.diameterMm).toBeGreaterThan(ACSR_CONDUCTORS[i - 1]!.diameterMm); // ASTM B232 / textbook ACSR table
      expect(ACSR_CONDUCTORS[i]!.resistanceAc75OhmPerM).toBeLessThan(ACSR_CONDUCTORS[i - 1]!.resistanceAc75OhmPerM);
    }
  });

  it('defaults emissivity and absorptivity to 0.5 and maps to the thermal input', () => {
    expect(DEFAULT_EMISSIVITY).toBe(0.5); // common practice, no published source
    expect(DEFAULT_ABSORPTIVITY).toBe(0.5); // common practice, no published source
    const t = thermalConductorOf(findConductor('Hawk')!, { emissivity: 0.8 });
    expect(t).toMatchObject({ tempLowC: 25, tempHighC: 75, emissivity: 0.8, absorptivity: 0.5, diameterMm: 21.79 });
    expect(findConductor('Nonesuch')).toBeUndefined();
  });
});
