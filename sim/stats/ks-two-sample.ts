/**
 * Two-sample Kolmogorov-Smirnov test (Smirnov 1948, Ann Math Stat 19:279).
 *
 * D = sup_x |F_a(x) - F_b(x)| over the two empirical distribution functions.
 * p-value from the asymptotic Kolmogorov distribution at
 * lambda = sqrt(n m / (n + m)) * D; 5% critical value
 * c(0.05) * sqrt((n + m)/(n m)) with c(0.05) = 1.3581 (the handbook 1.358).
 * With ties (values on a time grid, or censored delays coded as +Infinity) the
 * test is conservative: the true rejection rate is below the nominal level.
 * Infinity is allowed as a value (it ties only with itself); NaN is rejected.
 *
 * @example ks2([1, 2, 3], [4, 5, 6]) // { d: 1, ... }
 */
import { kolmogorovQuantile, kolmogorovUpperTail } from "./kolmogorov-distribution";
import { sortedCopy } from "./sorted-copy";

export interface KsResult {
  /** The KS statistic D in [0, 1]. */
  d: number;
  /** Asymptotic p-value (two-sided). NaN when a sample is empty. */
  pValue: number;
  /** D above which the test rejects at the 5% level (asymptotic). */
  critical05: number;
  n: number;
  m: number;
}

const C_05 = kolmogorovQuantile(0.05);

/** The 5% two-sample critical value of D for sample sizes n and m. */
export function ksCritical05(n: number, m: number): number {
  return C_05 * Math.sqrt((n + m) / (n * m));
}

export function ks2(a: readonly number[], b: readonly number[]): KsResult {
  const x = sortedCopy(a);
  const y = sortedCopy(b);
  const n = x.length;
  const m = y.length;
  if (n === 0 || m === 0) return { d: NaN, pValue: NaN, critical05: NaN, n, m };
  let i = 0;
  let j = 0;
  let d = 0;
  while (i < n || j < m) {
    // the next distinct value of the pooled sample
    const v = j >= m || (i < n && x[i] <= y[j]) ? x[i] : y[j];
    while (i < n && x[i] === v) i++;
    while (j < m && y[j] === v) j++;
    const diff = Math.abs(i / n - j / m);
    if (diff > d) d = diff;
  }
  const lambda = Math.sqrt((n * m) / (n + m)) * d;
  return { d, pValue: kolmogorovUpperTail(lambda), critical05: ksCritical05(n, m), n, m };
}
