// Sample quantiles by linear interpolation between order statistics (Hyndman & Fan 1996, definition 7,
// the default of R and of most statistics libraries).

/** The p-quantile (0 ≤ p ≤ 1) of values already sorted ascending; NaN for an empty list. */
export function quantileSorted(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  if (p <= 0) return sorted[0];
  if (p >= 1) return sorted[n - 1];
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const v = sorted[lo];
  return lo + 1 < n ? v + (h - lo) * (sorted[lo + 1] - v) : v;
}

/** P10 / P50 / P90 of an unsorted list (copied and sorted). */
export function p10p50p90(values: ArrayLike<number>): { p10: number; p50: number; p90: number } {
  const sorted = Float64Array.from(values as ArrayLike<number>).sort();
  return { p10: quantileSorted(sorted, 0.1), p50: quantileSorted(sorted, 0.5), p90: quantileSorted(sorted, 0.9) };
}
