/**
 * Pooled autocorrelation of a set of equally sampled series (each centred on
 * its own mean): C(k) = sum_r sum_i (y_ri - m_r)(y_r,i+k - m_r) / sum_r sum_i (y_ri - m_r)^2,
 * the standard biased estimator (Box & Jenkins 1976, Time Series Analysis,
 * section 2.1.5) averaged over replicates. Returns null when every series is
 * constant.
 */
export function pooledAutocorrelation(series: Float64Array[], maxLag: number): Float64Array | null {
  const acf = new Float64Array(maxLag + 1);
  let c0 = 0;
  for (const y of series) {
    const n = y.length;
    let m = 0;
    for (let i = 0; i < n; i++) m += y[i];
    m /= n;
    for (let k = 0; k <= Math.min(maxLag, n - 1); k++) {
      let s = 0;
      for (let i = 0; i + k < n; i++) s += (y[i] - m) * (y[i + k] - m);
      acf[k] += s;
    }
    let v = 0;
    for (let i = 0; i < n; i++) v += (y[i] - m) ** 2;
    c0 += v;
  }
  if (!(c0 > 0)) return null;
  for (let k = 0; k <= maxLag; k++) acf[k] /= c0;
  return acf;
}

export interface AcfRinging {
  /** Lag (samples) and value of the first local minimum after lag 0. */
  troughLag: number;
  trough: number;
  /** Lag (samples) and value of the first local maximum after that trough (-1 / NaN when none). */
  peakLag: number;
  peak: number;
}

/** The first trough and the first peak after it of an autocorrelation function. */
export function acfRinging(acf: Float64Array): AcfRinging {
  let troughLag = -1;
  for (let k = 1; k < acf.length - 1; k++)
    if (acf[k] < acf[k - 1] && acf[k] <= acf[k + 1]) {
      troughLag = k;
      break;
    }
  if (troughLag < 0) return { troughLag: -1, trough: NaN, peakLag: -1, peak: NaN };
  let peakLag = -1;
  for (let k = troughLag + 1; k < acf.length - 1; k++)
    if (acf[k] > acf[k - 1] && acf[k] >= acf[k + 1]) {
      peakLag = k;
      break;
    }
  return { troughLag, trough: acf[troughLag], peakLag, peak: peakLag > 0 ? acf[peakLag] : NaN };
}

/**
 * Spread of the oscillation amplitude from a delay embedding: each series is
 * smoothed by a centred moving average of `smooth` samples and centred on its
 * mean; the point (y_i, y_{i+q}) with q a quarter of `period` samples is the
 * oscillation in quadrature, and its distance from the centre is the
 * instantaneous amplitude (a sine gives a circle). Returns the coefficient of
 * variation and the mean of that amplitude over all samples of all series.
 */
export function amplitudeSpread(
  series: Float64Array[],
  period: number,
  smooth: number,
): { cv: number; mean: number; windows: number } {
  const q = Math.max(1, Math.round(period / 4));
  const h = Math.max(0, Math.floor(smooth / 2));
  let n0 = 0,
    s1 = 0,
    s2 = 0;
  for (const y of series) {
    const n = y.length;
    const s = new Float64Array(n);
    let m = 0;
    for (let i = 0; i < n; i++) {
      let sum = 0,
        c = 0;
      for (let j = Math.max(0, i - h); j <= Math.min(n - 1, i + h); j++) {
        sum += y[j];
        c++;
      }
      s[i] = sum / c;
      m += s[i] / n;
    }
    for (let i = 0; i + q < n; i++) {
      const r = Math.hypot(s[i] - m, s[i + q] - m);
      n0++;
      s1 += r;
      s2 += r * r;
    }
  }
  if (n0 < 2) return { cv: NaN, mean: NaN, windows: n0 };
  const mean = s1 / n0;
  const v = Math.max(0, (s2 - n0 * mean * mean) / (n0 - 1));
  return { cv: mean > 0 ? Math.sqrt(v) / mean : NaN, mean, windows: Math.floor(n0 / period) };
}
