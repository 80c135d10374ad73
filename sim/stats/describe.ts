/**
 * Descriptive summary of a sample: count, mean, sample standard deviation
 * (n - 1 denominator), coefficient of variation, extremes and the 10/25/50/75/90%
 * quantiles (Hyndman & Fan definition 7). Mean by the two-pass algorithm for
 * accuracy (Chan, Golub & LeVeque 1983, Am Stat 37:242). Fields are null when
 * undefined (empty sample; sd and cv need n >= 2 and a non-zero mean).
 *
 * @example describe([1, 2, 3]).mean // 2
 */
import { quantileSorted } from "./quantile";
import { sortedCopy } from "./sorted-copy";

export interface Description {
  n: number;
  mean: number | null;
  sd: number | null;
  cv: number | null;
  min: number | null;
  q10: number | null;
  q25: number | null;
  median: number | null;
  q75: number | null;
  q90: number | null;
  max: number | null;
}

export function mean(values: ArrayLike<number>): number {
  if (values.length === 0) return NaN;
  let s = 0;
  for (let i = 0; i < values.length; i++) s += values[i];
  return s / values.length;
}

/** Sample variance with the n - 1 denominator (two-pass). NaN when n < 2. */
export function sampleVariance(values: ArrayLike<number>): number {
  const n = values.length;
  if (n < 2) return NaN;
  const m = mean(values);
  let ss = 0;
  let comp = 0;
  for (let i = 0; i < n; i++) {
    const v = values[i];
    ss += (v - m) * (v - m);
    comp += v - m;
  }
  return (ss - (comp * comp) / n) / (n - 1);
}

const orNull = (x: number): number | null => (Number.isFinite(x) ? x : null);

export function describe(values: readonly number[]): Description {
  return describeSorted(sortedCopy(values));
}

/**
 * describe of numbers in a Float64Array that may be reordered: sorted in place (no copy), the same result as
 * describe of them (which sorts a Float64Array copy the same way). Throws on NaN as describe does.
 */
export function describeInPlace(values: Float64Array): Description {
  return describeSorted(sortInPlace(values));
}

/** The median of numbers in a Float64Array that may be reordered (sorted in place): describe(values).median. */
export function medianInPlace(values: Float64Array): number | null {
  return values.length === 0 ? null : quantileSorted(sortInPlace(values), 0.5);
}

function sortInPlace(values: Float64Array): Float64Array {
  return noNaN(values).sort();
}

/** The values, after checking that none is NaN (the check sortInPlace makes). */
export function noNaN<T extends ArrayLike<number>>(values: T): T {
  for (let i = 0; i < values.length; i++) if (values[i] !== values[i]) throw new RangeError("sample contains NaN");
  return values;
}

/** medianInPlace of values already in Float64Array sort order (merged sorted runs): the same checks and result. */
export function medianSorted(sorted: Float64Array): number | null {
  return sorted.length === 0 ? null : quantileSorted(noNaN(sorted), 0.5);
}

/** describe of numbers already ascending (as describe sorts them: -0 before +0, no NaN), without sorting. */
export function describeSorted(sorted: ArrayLike<number>): Description {
  const n = sorted.length;
  if (n === 0) {
    return {
      n: 0,
      mean: null,
      sd: null,
      cv: null,
      min: null,
      q10: null,
      q25: null,
      median: null,
      q75: null,
      q90: null,
      max: null,
    };
  }
  const m = mean(sorted);
  const sd = n >= 2 ? Math.sqrt(Math.max(0, sampleVariance(sorted))) : NaN;
  return {
    n,
    mean: orNull(m),
    sd: orNull(sd),
    cv: m !== 0 ? orNull(sd / m) : null,
    min: sorted[0],
    q10: quantileSorted(sorted, 0.1),
    q25: quantileSorted(sorted, 0.25),
    median: quantileSorted(sorted, 0.5),
    q75: quantileSorted(sorted, 0.75),
    q90: quantileSorted(sorted, 0.9),
    max: sorted[n - 1],
  };
}
