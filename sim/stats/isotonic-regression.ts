/**
 * Weighted isotonic (non-decreasing) regression by pool-adjacent-violators
 * (Ayer, Brunk, Ewing, Reid & Silverman 1955, Ann Math Stat 26:641).
 *
 * Given values y_i with weights w_i > 0 in a fixed order, returns the
 * non-decreasing sequence f minimising sum w_i (y_i - f_i)^2. For binomial pass
 * fractions y_i = passed_i / trials_i with weights trials_i this is also the
 * maximum-likelihood estimate under the sole assumption that the pass
 * probability does not fall along the order. Adjacent values that violate the
 * order are pooled into blocks whose value is their weighted mean.
 *
 * @example isotonicRegression([0.2, 0.6, 0.4, 0.9], [10, 10, 10, 10]) // [0.2, 0.5, 0.5, 0.9]
 */
export function isotonicRegression(values: readonly number[], weights: readonly number[]): number[] {
  if (values.length !== weights.length) throw new RangeError("isotonicRegression: values and weights differ in length");
  const blocks: { value: number; weight: number; size: number }[] = [];
  values.forEach((y, i) => {
    const w = weights[i];
    if (!(w > 0) || !Number.isFinite(y)) throw new RangeError("isotonicRegression: weights must be > 0, values finite");
    blocks.push({ value: y, weight: w, size: 1 });
    while (blocks.length > 1 && blocks[blocks.length - 2].value > blocks[blocks.length - 1].value) {
      const b = blocks.pop()!;
      const a = blocks[blocks.length - 1];
      const weight = a.weight + b.weight;
      a.value = (a.value * a.weight + b.value * b.weight) / weight;
      a.weight = weight;
      a.size += b.size;
    }
  });
  return blocks.flatMap((b) => Array<number>(b.size).fill(b.value));
}
