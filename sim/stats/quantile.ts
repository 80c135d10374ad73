/**
 * Sample quantile by linear interpolation between order statistics,
 * definition 7 of Hyndman & Fan 1996 (Am Stat 50:361), the default of most
 * statistics software: h = (n - 1) p, Q = x_floor(h) + (h - floor h)(x_ceil(h) - x_floor(h))
 * on the ascending sample (0-based). NaN for an empty sample.
 *
 * @example quantileSorted([1, 2, 3, 4, 5, 6, 7, 8, 9, 10], 0.25) // 3.25
 */
export function quantileSorted(sorted: ArrayLike<number>, p: number): number {
  if (!(p >= 0 && p <= 1)) throw new RangeError("quantile p must be in [0, 1]");
  const n = sorted.length;
  if (n === 0) return NaN;
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  const frac = h - lo;
  return frac === 0 ? sorted[lo] : sorted[lo] + frac * (sorted[hi] - sorted[lo]);
}
