/**
 * Duration key for figures by input pulse duration: the pulse record's
 * durationBin rounded to 10 significant digits, so durations that differ only
 * by floating-point round-off (a pulse's off - on, e.g. 35.8 - 20 =
 * 15.799999999999997) fall into one entry.
 *
 * @example normalizeDuration(15.799999999999955) // 15.8
 */
export function normalizeDuration(durationBin: number): number {
  return Number.isFinite(durationBin) ? Number(durationBin.toPrecision(10)) : durationBin;
}

/** normalizeDuration with a per-call-site cache (runs have few distinct durations). */
export function durationNormalizer(): (durationBin: number) => number {
  const cache = new Map<number, number>();
  return (d) => {
    let v = cache.get(d);
    if (v === undefined) {
      v = normalizeDuration(d);
      cache.set(d, v);
    }
    return v;
  };
}
