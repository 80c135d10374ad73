/**
 * Ascending numeric copy of a sample (never sorts the caller's array).
 * Throws on NaN so a missing value cannot silently shift ranks or quantiles.
 */
export function sortedCopy(values: readonly number[]): number[] {
  const out = Float64Array.from(values);
  for (let i = 0; i < out.length; i++) {
    if (Number.isNaN(out[i])) throw new RangeError("sample contains NaN");
  }
  out.sort();
  return Array.from(out);
}
