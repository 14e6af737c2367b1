import { describe, it, expect } from 'vitest';
import { toDisplay, fromDisplay, formatQuantity, unitLabel, conductorSizeLabel, MM2_PER_KCMIL, type QuantityKind } from '../../shared/units.ts';

describe('units', () => {
  it('converts metres to feet and back', () => {
    expect(toDisplay(3.048, 'length', 'us')).toBeCloseTo(10, 12); // international foot, 0.3048 m (exact definition)
    expect(fromDisplay(11, 'length', 'us')).toBeCloseTo(3.3528, 12);
    expect(toDisplay(3.048, 'length', 'metric')).toBe(3.048);
  });

  it('converts millimetres to inches', () => {
    expect(toDisplay(28.14, 'diameter', 'us')).toBeCloseTo(1.108, 3); // ASTM B232 / textbook ACSR table (Drake 28.14 mm = 1.108 in)
  });

  it('converts °C to °F', () => {
    expect(toDisplay(100, 'temperature', 'us')).toBeCloseTo(212, 12); // direct computation
    expect(toDisplay(-40, 'temperature', 'us')).toBeCloseTo(-40, 12); // direct computation
    expect(fromDisplay(104, 'temperature', 'us')).toBeCloseTo(40, 12);
  });

  it('shows conductor area in kcmil and labels AWG sizes', () => {
    expect(MM2_PER_KCMIL).toBeCloseTo(0.506707, 6); // direct computation (1000 circular mils)
    expect(toDisplay(795 * MM2_PER_KCMIL, 'conductor-area', 'us')).toBeCloseTo(795, 9);
    expect(conductorSizeLabel(795, 'us')).toBe('795 kcmil');
    expect(conductorSizeLabel(211.6, 'us')).toBe('4/0 AWG');
    expect(conductorSizeLabel(266.8, 'us')).toBe('266.8 kcmil');
    expect(conductorSizeLabel(795, 'metric')).toBe('402.8 mm²');
  });

  it('shows resistance per length as Ω/kft or Ω/km', () => {
    expect(toDisplay(0.0222 / 304.8, 'resistance-per-length', 'us')).toBeCloseTo(0.0222, 12); // ASTM B232 / textbook ACSR table (Drake R_AC25)
    expect(toDisplay(7.283e-5, 'resistance-per-length', 'metric')).toBeCloseTo(0.07283, 12);
  });

  it('round-trips every kind in both systems', () => {
    const kinds: QuantityKind[] = ['length', 'diameter', 'temperature', 'power', 'current', 'voltage', 'speed', 'mass', 'resistance-per-length', 'conductor-area', 'linear-mass', 'energy', 'duration'];
    for (const kind of kinds) {
      for (const system of ['metric', 'us'] as const) {
        expect(fromDisplay(toDisplay(12.345, kind, system), kind, system)).toBeCloseTo(12.345, 10);
        expect(unitLabel(kind, system).length).toBeGreaterThan(0);
      }
    }
  });

  it('formats quantities with their unit', () => {
    expect(formatQuantity(3.3528, 'length', 'us')).toBe('11.0 ft');
    expect(formatQuantity(3.3528, 'length', 'metric')).toBe('3.35 m');
    expect(formatQuantity(40, 'temperature', 'us')).toBe('104.0 °F');
    expect(formatQuantity(84.31, 'power', 'us')).toBe('84.3 W');
    expect(formatQuantity(1025.4, 'current', 'metric')).toBe('1,025 A');
    expect(formatQuantity(1.628, 'linear-mass', 'us')).toBe('1.094 lb/ft'); // Electric Power Engineering Handbook (Drake 1.094 lb/ft)
    expect(formatQuantity(2.5, 'mass', 'us', { digits: 1 })).toBe('5.5 lb');
    expect(formatQuantity(null, 'length', 'us')).toBe('—');
    expect(formatQuantity(Infinity, 'duration', 'metric')).toBe('∞ min');
  });
});
