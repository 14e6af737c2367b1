import { describe, it, expect } from 'vitest';
import { parabolicSag, catenarySag, catenarySagM } from '../../../shared/engineering/sag.ts';

describe('sag', () => {
  it('when Drake spans 700 ft at H = 6300 lb, then the catenary sag is 10.65 ft', () => {
    // Electric Power Engineering Handbook sag example (table for Drake); the table rounds, so ±0.02 ft.
    expect(Math.abs(catenarySag(700, 1.094, 6300) - 10.65)).toBeLessThan(0.02);
  });

  it('when the same span is treated as a parabola, then it agrees to within 0.1 %', () => {
    const p = parabolicSag(700, 1.094, 6300);
    expect(p).toBeCloseTo((1.094 * 700 ** 2) / (8 * 6300), 10); // direct computation, D = wS²/8H
    expect(Math.abs(p - catenarySag(700, 1.094, 6300)) / p).toBeLessThan(0.001); // Electric Power Engineering Handbook (parabola ≈ catenary for shallow sag)
  });

  it('when the span is long and slack, then the catenary sags more than the parabola', () => {
    expect(catenarySag(2000, 2, 1000)).toBeGreaterThan(parabolicSag(2000, 2, 1000)); // direct computation (cosh > its quadratic)
  });

  it('converts mass per metre and tension in newtons to the same sag in metres', () => {
    const ft = catenarySag(700, 1.094, 6300);
    const m = catenarySagM(700 * 0.3048, (1.094 * 0.45359237) / 0.3048, 6300 * 0.45359237 * 9.80665);
    expect(m / 0.3048).toBeCloseTo(ft, 6); // direct computation (unit consistency)
  });

  it('rejects a non-positive tension', () => {
    expect(() => parabolicSag(100, 1, 0)).toThrow(RangeError);
  });
});
