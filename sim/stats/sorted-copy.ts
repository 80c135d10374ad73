/**
 * Ascending numeric copy of a sample (never sorts the caller's array).
 * Throws on NaN so a missing value cannot silently shift ranks or quantiles.
 * Sorts in a Float64Array (numeric order, fast) and returns a plain array.
 */
export function sortedCopy(values: readonly number[]): number[] {
  const n = values.length;
  const buf = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const v = values[i];
    if (v !== v) throw new RangeError("sample contains NaN");
    buf[i] = v;
  }
  buf.sort();
  const out = new Array<number>(n);
  for (let i = 0; i < n; i++) out[i] = buf[i];
  return out;
}
