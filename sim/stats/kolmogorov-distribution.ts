/**
 * The Kolmogorov distribution: limit law of sqrt(n) * sup|F_n - F| (and of
 * sqrt(nm/(n+m)) * D for two samples) under the null hypothesis
 * (Kolmogorov 1933; Smirnov 1948 for two samples).
 *
 *   Q(lambda) = P(K > lambda) = 2 sum_{k>=1} (-1)^{k-1} exp(-2 k^2 lambda^2)
 *
 * For small lambda the equivalent Jacobi-theta form
 *   P(K <= lambda) = (sqrt(2 pi)/lambda) sum_{k>=1} exp(-(2k-1)^2 pi^2 / (8 lambda^2))
 * converges faster and is used below lambda = 1.18 (Marsaglia, Tsang & Wang
 * 2003, J Stat Softw 8(18), discuss both forms).
 *
 * @example kolmogorovUpperTail(1.3581) // about 0.05
 */
export function kolmogorovUpperTail(lambda: number): number {
  if (!(lambda > 0)) return 1;
  if (lambda < 1.18) {
    const y = (Math.PI * Math.PI) / (8 * lambda * lambda);
    let sum = 0;
    for (let k = 1; k <= 50; k++) {
      const term = Math.exp(-(2 * k - 1) * (2 * k - 1) * y);
      sum += term;
      if (term < 1e-17 * sum) break;
    }
    return Math.min(1, Math.max(0, 1 - (Math.sqrt(2 * Math.PI) / lambda) * sum));
  }
  let sum = 0;
  for (let k = 1; k <= 100; k++) {
    const term = Math.exp(-2 * k * k * lambda * lambda);
    sum += (k % 2 === 1 ? 1 : -1) * term;
    if (term < 1e-17) break;
  }
  return Math.min(1, Math.max(0, 2 * sum));
}

/** lambda with kolmogorovUpperTail(lambda) = alpha, by bisection (alpha in (0, 1)). */
export function kolmogorovQuantile(alpha: number): number {
  if (!(alpha > 0 && alpha < 1)) throw new RangeError("alpha must be in (0, 1)");
  let lo = 0.01;
  let hi = 10;
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi);
    if (kolmogorovUpperTail(mid) > alpha) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}
