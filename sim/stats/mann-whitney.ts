/**
 * Mann-Whitney U test (Mann & Whitney 1947, Ann Math Stat 18:50), equivalent to
 * the Wilcoxon rank-sum test (Wilcoxon 1945, Biometrics Bull 1:80).
 *
 * Ranks of the pooled sample with mid-ranks for ties; U_a = R_a - n(n+1)/2.
 * Normal approximation with the tie correction of the variance
 *   var U = (n m / 12) * ((N + 1) - sum(t^3 - t) / (N (N - 1)))
 * and a continuity correction of 1/2 (the common default), two-sided p.
 * Effect size: rank-biserial r = 2 U_a/(n m) - 1 (Cureton 1956; Kerby 2014,
 * Compr Psychol 3:11), in [-1, 1], positive when values of `a` tend to be
 * larger; probabilityAGreater = U_a/(n m) = P(A > B) + P(A = B)/2.
 * +Infinity is allowed (censored "no response" ranks above every observed
 * delay and ties with other censored values); NaN is rejected.
 *
 * @example mannWhitney([1, 2, 3], [4, 5, 6]).u // 0
 */
import { normalTwoSidedP } from "./normal-distribution";

export interface MannWhitneyResult {
  /** U statistic of the first sample. */
  u: number;
  /** Rank sum of the first sample (mid-ranks, from 1). */
  rankSumA: number;
  /** Standardised statistic after continuity correction (0 when U equals its mean). */
  z: number;
  /** Two-sided p-value, normal approximation. NaN when a sample is empty. */
  pValue: number;
  rankBiserial: number;
  probabilityAGreater: number;
  n: number;
  m: number;
}

export function mannWhitney(a: readonly number[], b: readonly number[]): MannWhitneyResult {
  const n = a.length;
  const m = b.length;
  if (n === 0 || m === 0) {
    return { u: NaN, rankSumA: NaN, z: NaN, pValue: NaN, rankBiserial: NaN, probabilityAGreater: NaN, n, m };
  }
  const pooled: { v: number; fromA: boolean }[] = [];
  for (const v of a) pooled.push({ v, fromA: true });
  for (const v of b) pooled.push({ v, fromA: false });
  for (const p of pooled) if (Number.isNaN(p.v)) throw new RangeError("sample contains NaN");
  pooled.sort((p, q) => (p.v < q.v ? -1 : p.v > q.v ? 1 : 0));
  const total = n + m;
  let rankSumA = 0;
  let tieSum = 0;
  let i = 0;
  while (i < total) {
    let j = i;
    while (j + 1 < total && pooled[j + 1].v === pooled[i].v) j++;
    const t = j - i + 1;
    const midRank = (i + 1 + j + 1) / 2;
    for (let k = i; k <= j; k++) if (pooled[k].fromA) rankSumA += midRank;
    if (t > 1) tieSum += t * t * t - t;
    i = j + 1;
  }
  const u = rankSumA - (n * (n + 1)) / 2;
  const meanU = (n * m) / 2;
  const varU = ((n * m) / 12) * (total + 1 - tieSum / (total * (total - 1)));
  let z = 0;
  let pValue = 1;
  if (varU > 0) {
    const diff = u - meanU;
    const corrected = Math.sign(diff) * Math.max(0, Math.abs(diff) - 0.5);
    z = corrected / Math.sqrt(varU);
    pValue = normalTwoSidedP(z);
  }
  const probabilityAGreater = u / (n * m);
  return { u, rankSumA, z, pValue, rankBiserial: 2 * probabilityAGreater - 1, probabilityAGreater, n, m };
}
