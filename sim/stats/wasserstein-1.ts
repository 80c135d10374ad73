/**
 * Wasserstein-1 (earth mover's) distance between two empirical distributions
 * on the line: W1 = integral |F_a(x) - F_b(x)| dx (Vallender 1974, Theory
 * Probab Appl 18:784, for the one-dimensional identity). Same unit as the
 * values (minutes for delays). Finite values only.
 *
 * @example wasserstein1([0, 1], [2, 3]) // 2
 */
import { sortedCopy } from "./sorted-copy";

export function wasserstein1(a: readonly number[], b: readonly number[]): number {
  const x = sortedCopy(a);
  const y = sortedCopy(b);
  const n = x.length;
  const m = y.length;
  if (n === 0 || m === 0) return NaN;
  if (!Number.isFinite(x[0]) || !Number.isFinite(x[n - 1]) || !Number.isFinite(y[0]) || !Number.isFinite(y[m - 1])) {
    throw new RangeError("wasserstein1 needs finite values");
  }
  let i = 0;
  let j = 0;
  let total = 0;
  let prev = Math.min(x[0], y[0]);
  while (i < n || j < m) {
    const v = j >= m || (i < n && x[i] <= y[j]) ? x[i] : y[j];
    // on [prev, v) both ECDFs are constant
    total += Math.abs(i / n - j / m) * (v - prev);
    while (i < n && x[i] === v) i++;
    while (j < m && y[j] === v) j++;
    prev = v;
  }
  return total;
}
