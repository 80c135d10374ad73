/**
 * Holm's step-down adjustment of p-values for multiple comparisons (Holm 1979,
 * Scand J Stat 6:65). Controls the family-wise error rate without assuming
 * independence. Returns adjusted p-values in the input order:
 *   sort ascending p_(1) <= ... <= p_(k);
 *   adj_(i) = max_{j <= i} min(1, (k - j + 1) p_(j)).
 * NaN entries are passed through as NaN and do not count towards k.
 *
 * @example holm([0.01, 0.04, 0.03, 0.005]) // [0.03, 0.06, 0.06, 0.02]
 */
export function holm(pValues: readonly number[]): number[] {
  const idx = pValues
    .map((p, i) => ({ p, i }))
    .filter((e) => !Number.isNaN(e.p))
    .sort((x, y) => x.p - y.p || x.i - y.i);
  const k = idx.length;
  const out = pValues.map(() => NaN);
  let running = 0;
  idx.forEach((e, j) => {
    const adj = Math.min(1, (k - j) * e.p);
    running = Math.max(running, adj);
    out[e.i] = running;
  });
  return out;
}
