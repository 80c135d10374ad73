/**
 * Fixed-width histogram. Bin k covers [edges[k], edges[k+1]), the last bin is
 * closed on the right. Without options: Sturges' rule for the bin count,
 * ceil(log2 n) + 1 (Sturges 1926, J Am Stat Assoc 21:65), over [min, max].
 * Pass explicit edges' range and count to overlay several samples on the same
 * bins. Values outside the range are counted in `below` / `above`.
 *
 * @example histogram([0, 1, 1, 2], { binCount: 2 }) // edges [0, 1, 2], counts [1, 3]
 */
export interface Histogram {
  edges: number[];
  counts: number[];
  below: number;
  above: number;
}

export function sturgesBinCount(n: number): number {
  return n <= 1 ? 1 : Math.ceil(Math.log2(n)) + 1;
}

export function histogram(
  values: readonly number[] | Float64Array,
  options: { binCount?: number; min?: number; max?: number } = {},
): Histogram {
  // index loops over the values as they are (no filtered copy: a run's widths are a Float64Array of a million)
  let nFinite = 0;
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (!Number.isFinite(v)) continue;
    nFinite++;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  let min = options.min ?? (nFinite ? lo : 0);
  let max = options.max ?? (nFinite ? hi : 1);
  if (!(max > min)) {
    // a single value (or none): one unit-wide bin centred on it
    min = min - 0.5;
    max = min + 1;
  }
  const bins = Math.max(1, Math.floor(options.binCount ?? sturgesBinCount(nFinite)));
  const width = (max - min) / bins;
  const edges: number[] = [];
  for (let k = 0; k <= bins; k++) edges.push(k === bins ? max : min + k * width);
  const counts = new Array<number>(bins).fill(0);
  let below = 0;
  let above = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (!Number.isFinite(v)) continue;
    if (v < min) below++;
    else if (v > max) above++;
    else counts[Math.min(bins - 1, Math.floor((v - min) / width))]++;
  }
  return { edges, counts, below, above };
}
