/**
 * The per-pulse state machine of Linger's noise-filter figures (Linger's own
 * definitions, docs/metrics.md): hysteresis threshold crossings, response windows,
 * exclusion, response delay with censoring, OFF delay, pass, output pulse widths,
 * peak, time to peak and FWHM above the baseline.
 *
 * One implementation serves two kinds of path:
 * - "step": a stochastic (SSA) path, constant between events. The engine pushes
 *   each new output value at its event time, so crossings are found exactly on
 *   the event path (a sampled grid would miss brief passes near threshold).
 * - "linear": a sampled trace (uploaded data, grid comparisons), linearly
 *   interpolated between consecutive valid samples. A NaN sample is a gap: the
 *   next valid sample is joined to the last valid one as a step (no
 *   interpolation across a gap).
 *
 * Conventions (documented in docs/engine.md):
 * - Up-crossing: the output reaches theta (x >= theta) while below; down-crossing:
 *   the output falls below theta*(1-h) (x < downTheta) while above.
 * - The state "above" starts as x0 >= theta.
 * - Pulse i = [on_i, off_i); its window is [on_i, min(off_i + window, on_{i+1})).
 *   A pulse that starts with the state "above" is excluded (reported with
 *   excluded = true; its other fields are still filled in but must not enter pass
 *   or delay figures).
 * - A boundary (on, off, window end) at exactly the time of a crossing is
 *   processed before the crossing: a crossing at exactly on_i counts as a
 *   response with delay 0, one at exactly the window end does not count.
 * - Widths: from an up-crossing inside pulse i's window to the next
 *   down-crossing (which may fall after the window); an output pulse still open
 *   at the end of the path is not reported (censored).
 * - Peak: the largest output value in the window (at on_i, at samples/events in
 *   the window, and for linear paths at the window end), timeToPeak from on_i to
 *   its first occurrence. baseline = output at on_i. FWHM: from the first time
 *   the output reaches baseline + (peak - baseline)/2 to the first time after the
 *   peak that it falls below that level, inside the window; null when the peak
 *   does not exceed the baseline or the fall is not seen in the window.
 * - A window still open at the end of the path is closed there (censored).
 *
 * Allocation: none per event (a reused growable Float64Array holds the window's
 * path for FWHM); one PulseStat per pulse.
 */
import type { PulseStat } from "@/shared/schemas/run-spec";

/** An input pulse as the tracker needs it. */
export interface TrackedPulse {
  on: number;
  off: number;
  durationBin: number;
}

/** Threshold levels (see resolveThreshold). */
export interface TrackerThreshold {
  theta: number;
  downTheta: number;
  windowMinutes: number;
}

export type PathKind = "step" | "linear";

const PHASE_BEFORE_ON = 0;
const PHASE_ON = 1;
const PHASE_AFTER_OFF = 2;

export class PulseTracker {
  private readonly ons: Float64Array;
  private readonly offs: Float64Array;
  private readonly ends: Float64Array;
  private readonly bins: Float64Array;
  private readonly nPulses: number;
  private readonly theta: number;
  private readonly down: number;
  private readonly linear: boolean;

  // path state
  private tp = 0;
  private xp = 0;
  private gap = false;
  private above = false;
  private replicate = 0;

  // pulse state
  private k = 0;
  private phase = PHASE_BEFORE_ON;
  private nextBoundary = Infinity;
  private current: PulseStat | null = null;
  private peakT = 0;
  private stats: PulseStat[] = [];
  /** Pulse record an open output pulse (up-crossing seen, down not yet) belongs to. */
  private openWidth: PulseStat | null = null;
  private openWidthStart = 0;

  // window path buffer (t, x) pairs for FWHM
  private buf = new Float64Array(1024);
  private nBuf = 0;

  constructor(pulses: readonly TrackedPulse[], threshold: TrackerThreshold, kind: PathKind = "step") {
    const n = pulses.length;
    this.nPulses = n;
    this.ons = new Float64Array(n);
    this.offs = new Float64Array(n);
    this.ends = new Float64Array(n);
    this.bins = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      this.ons[i] = pulses[i].on;
      this.offs[i] = pulses[i].off;
      this.bins[i] = pulses[i].durationBin;
    }
    for (let i = 0; i < n; i++) {
      const w = this.offs[i] + threshold.windowMinutes;
      this.ends[i] = i + 1 < n ? Math.min(w, this.ons[i + 1]) : w;
    }
    this.theta = threshold.theta;
    this.down = threshold.downTheta;
    this.linear = kind === "linear";
  }

  /** Starts a new path at time t0 with value x0 (x0 may be NaN: a gap until the first valid value). */
  reset(replicate: number, t0: number, x0: number): void {
    this.replicate = replicate;
    this.tp = t0;
    this.xp = x0;
    this.gap = Number.isNaN(x0);
    this.above = !this.gap && x0 >= this.theta;
    this.k = 0;
    this.phase = PHASE_BEFORE_ON;
    this.nextBoundary = this.nPulses > 0 ? this.ons[0] : Infinity;
    this.current = null;
    this.stats = [];
    this.openWidth = null;
    this.nBuf = 0;
  }

  /** The output takes value x at time t (t non-decreasing). Hot path for the SSA. */
  push(t: number, x: number): void {
    if (x !== x) {
      // NaN: a gap; boundaries are processed when the next valid value arrives
      this.gap = true;
      return;
    }
    const xp = this.xp;
    let tc = t;
    let crossing = 0; // 1 up, -1 down
    if (!this.above) {
      if (x >= this.theta) {
        crossing = 1;
        if (this.linear && !this.gap && x !== xp) tc = this.tp + ((this.theta - xp) / (x - xp)) * (t - this.tp);
      }
    } else if (x < this.down) {
      crossing = -1;
      if (this.linear && !this.gap && x !== xp) tc = this.tp + ((this.down - xp) / (x - xp)) * (t - this.tp);
    }
    if (this.nextBoundary <= tc) this.advance(tc, t, x);
    if (crossing === 1) this.upCrossing(tc);
    else if (crossing === -1) this.downCrossing(tc);
    if (this.nextBoundary <= t) this.advance(t, t, x);
    const cur = this.current;
    if (cur !== null) {
      if (x > cur.peak) {
        cur.peak = x;
        this.peakT = t;
      }
      this.append(t, x);
    }
    this.tp = t;
    this.xp = x;
    this.gap = false;
  }

  /**
   * The same as push(b[0], b[1]), push(b[2], b[3]), ... for the n/2 (t, x)
   * pairs in b[0..n): the engine's fast kernel buffers the output path and
   * hands it over in blocks. The common case (no NaN, no crossing, no boundary
   * reached) runs in a loop with the state in locals, doing exactly what push
   * does for it; every other pair goes through push.
   */
  pushPath(b: Float64Array, n: number): void {
    let i = 0;
    while (i < n) {
      if (!this.linear && !this.gap) {
        const theta = this.theta;
        const down = this.down;
        const above = this.above;
        const nb = this.nextBoundary;
        const cur = this.current;
        const i0 = i;
        if (cur === null) {
          for (; i < n; i += 2) {
            const t = b[i];
            const x = b[i + 1];
            if (x !== x || (above ? x < down : x >= theta) || nb <= t) break;
          }
        } else {
          let peak = cur.peak;
          let peakT = this.peakT;
          let buf = this.buf;
          let nBuf = this.nBuf;
          for (; i < n; i += 2) {
            const t = b[i];
            const x = b[i + 1];
            if (x !== x || (above ? x < down : x >= theta) || nb <= t) break;
            if (x > peak) {
              peak = x;
              peakT = t;
            }
            if (nBuf + 2 > buf.length) {
              const nbuf = new Float64Array(buf.length * 2);
              nbuf.set(buf);
              buf = nbuf;
            }
            buf[nBuf] = t;
            buf[nBuf + 1] = x;
            nBuf += 2;
          }
          cur.peak = peak;
          this.peakT = peakT;
          this.buf = buf;
          this.nBuf = nBuf;
        }
        if (i > i0) {
          this.tp = b[i - 2];
          this.xp = b[i - 1];
        }
      }
      if (i < n) {
        this.push(b[i], b[i + 1]);
        i += 2;
      }
    }
  }

  /** Ends the path at tEnd and returns the pulse records (pulses whose window opened). */
  finish(tEnd: number): PulseStat[] {
    if (this.nextBoundary <= tEnd) this.advance(tEnd, tEnd, this.xp, true);
    if (this.current !== null) this.closeWindow(tEnd, this.valueAt(tEnd, tEnd, this.xp, true));
    const out = this.stats;
    this.stats = [];
    this.openWidth = null;
    return out;
  }

  /** Value of the path at boundary time b, while the segment (tp,xp) -> (t,x) is being processed. */
  private valueAt(b: number, t: number, x: number, atEnd = false): number {
    const xp = this.xp;
    if (xp !== xp) return x; // nothing valid seen yet: use the first valid value
    if (atEnd || !this.linear || this.gap) return xp; // step: the value held before the jump at t
    if (t === this.tp) return x;
    return xp + ((x - xp) * (b - this.tp)) / (t - this.tp);
  }

  /** Processes every boundary at or before `limit`; (t, x) is the segment end being processed. */
  private advance(limit: number, t: number, x: number, atEnd = false): void {
    while (this.nextBoundary <= limit) {
      const b = this.nextBoundary;
      const i = this.k;
      if (this.phase === PHASE_BEFORE_ON) {
        const v = this.valueAt(b, t, x, atEnd);
        const stat: PulseStat = {
          replicate: this.replicate,
          pulseIndex: i,
          on: this.ons[i],
          off: this.offs[i],
          durationBin: this.bins[i],
          excluded: this.above,
          passed: false,
          delay: null,
          offDelay: null,
          widths: [],
          peak: v,
          timeToPeak: 0,
          fwhm: null,
          baseline: v,
        };
        this.stats.push(stat);
        this.current = stat;
        this.peakT = b;
        this.nBuf = 0;
        this.append(b, v);
        this.phase = PHASE_ON;
        this.nextBoundary = Math.min(this.offs[i], this.ends[i]);
      } else if (this.phase === PHASE_ON) {
        this.phase = PHASE_AFTER_OFF;
        this.nextBoundary = this.ends[i];
      } else {
        this.closeWindow(b, this.valueAt(b, t, x, atEnd));
        this.k = i + 1;
        this.phase = PHASE_BEFORE_ON;
        this.nextBoundary = this.k < this.nPulses ? this.ons[this.k] : Infinity;
      }
    }
  }

  private upCrossing(tc: number): void {
    this.above = true;
    const cur = this.current;
    if (cur !== null) {
      if (cur.delay === null) {
        cur.delay = tc - cur.on;
        cur.passed = true;
      }
      this.openWidth = cur;
      this.openWidthStart = tc;
    } else {
      this.openWidth = null;
    }
  }

  private downCrossing(tc: number): void {
    this.above = false;
    const cur = this.current;
    if (cur !== null && cur.offDelay === null && tc >= cur.off) cur.offDelay = tc - cur.off;
    if (this.openWidth !== null) {
      this.openWidth.widths.push(tc - this.openWidthStart);
      this.openWidth = null;
    }
  }

  private closeWindow(tEnd: number, vEnd: number): void {
    const cur = this.current;
    if (cur === null) return;
    if (this.linear && vEnd === vEnd) {
      if (vEnd > cur.peak) {
        cur.peak = vEnd;
        this.peakT = tEnd;
      }
      this.append(tEnd, vEnd);
    }
    cur.timeToPeak = this.peakT - cur.on;
    cur.fwhm = this.fwhm(cur.baseline, cur.peak);
    this.current = null;
  }

  private append(t: number, x: number): void {
    if (this.nBuf + 2 > this.buf.length) {
      const nb = new Float64Array(this.buf.length * 2);
      nb.set(this.buf);
      this.buf = nb;
    }
    this.buf[this.nBuf] = t;
    this.buf[this.nBuf + 1] = x;
    this.nBuf += 2;
  }

  private fwhm(baseline: number, peak: number): number | null {
    if (!(peak > baseline)) return null;
    const half = baseline + (peak - baseline) / 2;
    const b = this.buf;
    const n = this.nBuf;
    let rise = NaN;
    let iPeak = -1;
    for (let i = 0; i < n; i += 2) {
      if (Number.isNaN(rise) && b[i + 1] >= half) rise = this.crossTime(i, half);
      if (b[i + 1] === peak) {
        iPeak = i;
        break;
      }
    }
    if (Number.isNaN(rise) || iPeak < 0) return null;
    for (let i = iPeak + 2; i < n; i += 2) {
      if (b[i + 1] < half) return this.crossTime(i, half) - rise;
    }
    return null;
  }

  /** Time the buffered path reaches `level` on the segment ending at index i. */
  private crossTime(i: number, level: number): number {
    const b = this.buf;
    if (!this.linear || i === 0) return b[i];
    const t0 = b[i - 2];
    const x0 = b[i - 1];
    const t1 = b[i];
    const x1 = b[i + 1];
    if (x1 === x0) return t1;
    return t0 + ((level - x0) / (x1 - x0)) * (t1 - t0);
  }
}

/**
 * Pulse figures of a sampled trace (uploaded data or a grid), linear
 * interpolation between consecutive valid samples, NaN = gap (never
 * interpolated across). Times ascending.
 */
export function pulseStatsFromSampledTrace(
  times: ArrayLike<number>,
  values: ArrayLike<number>,
  pulses: readonly TrackedPulse[],
  threshold: TrackerThreshold,
  replicate = 0,
): PulseStat[] {
  const n = Math.min(times.length, values.length);
  if (n === 0) return [];
  const tracker = new PulseTracker(pulses, threshold, "linear");
  tracker.reset(replicate, times[0], values[0]);
  for (let i = 1; i < n; i++) tracker.push(times[i], values[i]);
  return tracker.finish(times[n - 1]);
}
