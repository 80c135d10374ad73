/**
 * Axis ticks a reader can take in at a glance: on a log axis the 1-2-5
 * sequence (1, 2, 5, 10, 20, 50, ...), on a linear axis steps of 1, 2 or 5
 * times a power of ten (common practice in scientific plotting). Used by the
 * on-screen charts and the chart images alike.
 *
 * @example niceLogTicks(0.8, 90)  // [1, 2, 5, 10, 20, 50]
 * @example niceLinearTicks(0, 1)  // [0, 0.2, 0.4, 0.6, 0.8, 1]
 */

/** Removes binary round-off: 0.30000000000000004 -> 0.3. */
function clean(v: number): number {
  return Number(v.toPrecision(12));
}

/**
 * Ticks of the 1-2-5 sequence inside [min, max] (both > 0). Drops the 2s and then the 5s when there would be more
 * than maxTicks; when the range holds no tick at all (for example 3 to 4), returns the range's ends.
 */
export function niceLogTicks(min: number, max: number, maxTicks = 8): number[] {
  if (!(min > 0) || !(max > 0) || !Number.isFinite(min) || !Number.isFinite(max)) return [];
  if (max < min) [min, max] = [max, min];
  const lo = Math.floor(Math.log10(min));
  const hi = Math.ceil(Math.log10(max));
  const within = (mults: number[]) => {
    const out: number[] = [];
    for (let e = lo; e <= hi; e++)
      for (const m of mults) {
        const v = clean(m * Math.pow(10, e));
        if (v >= min * (1 - 1e-9) && v <= max * (1 + 1e-9)) out.push(v);
      }
    return out;
  };
  for (const mults of [[1, 2, 5], [1, 5], [1]]) {
    const t = within(mults);
    if (t.length <= maxTicks && t.length >= 2) return t;
    if (t.length < 2) return t.length ? t : [clean(min), clean(max)];
  }
  // Many decades: every k-th power of ten.
  const decades = within([1]);
  const k = Math.ceil(decades.length / maxTicks);
  return decades.filter((_, i) => i % k === 0);
}

/** Linear ticks at multiples of 1, 2 or 5 x 10^k covering [min, max] with about `count` intervals. */
export function niceLinearTicks(min: number, max: number, count = 5): number[] {
  if (!Number.isFinite(min) || !Number.isFinite(max)) return [];
  if (max < min) [min, max] = [max, min];
  if (max === min) return [clean(min)];
  const raw = (max - min) / Math.max(1, count);
  const p = Math.pow(10, Math.floor(Math.log10(raw)));
  const step = [1, 2, 5, 10].map((m) => m * p).find((s) => s >= raw * (1 - 1e-9)) ?? 10 * p;
  const first = Math.ceil(min / step - 1e-9);
  const last = Math.floor(max / step + 1e-9);
  const out: number[] = [];
  for (let i = first; i <= last; i++) out.push(clean(i * step));
  return out;
}
