/**
 * Dwell times of a sampled output in its on and off states, with hysteresis
 * (on when it reaches `upLevel`, off again when it falls to `downLevel`, as in
 * docs/metrics.md). A series starts in the state its first sample is in. The
 * last dwell of a series is censored at the series' end and is reported as
 * such (its true length is at least the value).
 */
export interface Dwells {
  on: { minutes: number; censored: boolean }[];
  off: { minutes: number; censored: boolean }[];
}

export function dwellTimes(y: Float64Array, sampleMinutes: number, upLevel: number, downLevel: number): Dwells {
  const out: Dwells = { on: [], off: [] };
  let n = y.length;
  while (n > 0 && Number.isNaN(y[n - 1])) n--;
  if (n === 0) return out;
  let on = y[0] >= upLevel;
  let since = 0;
  for (let i = 1; i < n; i++) {
    if (!on && y[i] >= upLevel) {
      out.off.push({ minutes: (i - since) * sampleMinutes, censored: false });
      on = true;
      since = i;
    } else if (on && y[i] <= downLevel) {
      out.on.push({ minutes: (i - since) * sampleMinutes, censored: false });
      on = false;
      since = i;
    }
  }
  (on ? out.on : out.off).push({ minutes: (n - 1 - since) * sampleMinutes, censored: true });
  return out;
}
