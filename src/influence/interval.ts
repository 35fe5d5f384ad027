/**
 * @module interval
 * Central intervals from posterior draws: the (1 − mass)/2 and (1 + mass)/2 sample quantiles with
 * linear interpolation between order statistics (Hyndman & Fan 1996, "Sample quantiles in
 * statistical packages", The American Statistician 50(4):361–365, definition 7).
 */

/** Quantile p ∈ [0, 1] of an ascending-sorted sample (Hyndman & Fan definition 7). */
export function sortedQuantile(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) return Number.NaN;
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, n - 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/** The central `mass` interval of a sample; a point estimate with no draws gives [point, point]. */
export function centralInterval(
  sample: Float64Array,
  mass: number,
  point: number,
): { low: number; high: number } {
  if (sample.length === 0) return { low: point, high: point };
  const sorted = Float64Array.from(sample).sort();
  return {
    low: sortedQuantile(sorted, (1 - mass) / 2),
    high: sortedQuantile(sorted, (1 + mass) / 2),
  };
}

/** Share of draws with value ≥ line; with no draws, 1 if the point is at or above the line, else 0. */
export function shareAtOrAbove(sample: Float64Array, line: number, point: number): number {
  if (sample.length === 0) return point >= line ? 1 : 0;
  let hits = 0;
  for (let k = 0; k < sample.length; k++) if (sample[k] >= line) hits++;
  return hits / sample.length;
}
