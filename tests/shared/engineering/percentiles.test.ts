import { describe, it, expect } from 'vitest';
import { quantileSorted as d3QuantileSorted } from 'd3-array';
import { prng } from '../../../shared/prng.ts';
import { p10p50p90, quantileSorted } from '../../../shared/engineering/percentiles.ts';

describe('percentiles (definition 7 of Hyndman & Fan, 1996)', () => {
  it('when compared with d3-array on random data, then every quantile agrees', () => {
    const rnd = prng(20261203);
    for (let t = 0; t < 200; t++) {
      const n = 1 + Math.floor(rnd() * 300);
      const values = Array.from({ length: n }, () => (rnd() - 0.2) * 1000);
      const sorted = [...values].sort((a, b) => a - b);
      for (const p of [0, 0.1, 0.25, 0.5, 0.9, 0.99, 1]) {
        // reference implementation: d3-array's quantileSorted (the same definition 7)
        expect(quantileSorted(sorted, p)).toBeCloseTo(d3QuantileSorted(sorted, p)!, 9);
      }
      const q = p10p50p90(values);
      expect(q.p50).toBeCloseTo(d3QuantileSorted(sorted, 0.5)!, 9);
      expect(q.p10).toBeLessThanOrEqual(q.p50);
      expect(q.p50).toBeLessThanOrEqual(q.p90);
    }
  });

  it('when the list is empty, then the quantile is NaN; one value is every quantile', () => {
    expect(quantileSorted([], 0.5)).toBeNaN();
    expect(p10p50p90([42])).toEqual({ p10: 42, p50: 42, p90: 42 });
  });
});
