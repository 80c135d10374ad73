/**
 * One ascending Float64Array from several, each already ascending in Float64Array sort order
 * (-0 before +0, no NaN): the same array as sorting them all together, in linear time per
 * level of a pairwise merge. A run's summary sorts each duration's sample for its median and
 * merges them for the whole run's figures instead of sorting every value again.
 *
 * @example mergeSorted([Float64Array.of(1, 3), Float64Array.of(2)]) // Float64Array [1, 2, 3]
 */
export function mergeSorted(parts: readonly Float64Array[]): Float64Array {
  if (parts.length === 0) return new Float64Array(0);
  let level = parts.slice();
  while (level.length > 1) {
    const next: Float64Array[] = [];
    for (let k = 0; k < level.length; k += 2)
      next.push(k + 1 < level.length ? mergeTwo(level[k], level[k + 1]) : level[k]);
    level = next;
  }
  return level.length === 1 && parts.length === 1 ? parts[0].slice() : level[0];
}

/** Before in sort order: smaller, or -0 before +0. */
const before = (x: number, y: number) => x < y || (x === 0 && y === 0 && 1 / x < 0 && 1 / y > 0);

function mergeTwo(a: Float64Array, b: Float64Array): Float64Array {
  const out = new Float64Array(a.length + b.length);
  let i = 0;
  let j = 0;
  let k = 0;
  while (i < a.length && j < b.length) out[k++] = before(b[j], a[i]) ? b[j++] : a[i++];
  while (i < a.length) out[k++] = a[i++];
  while (j < b.length) out[k++] = b[j++];
  return out;
}
