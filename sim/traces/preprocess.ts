/**
 * Preprocessing of single-cell traces before the pulse figures (docs/traces.md):
 *
 * 1. Gaps. The typical frame interval is the median of all positive spacings
 *    between consecutive frames over every cell. A spacing larger than
 *    gapFactor x that interval is a gap: a NaN sample is inserted in it so the
 *    pulse tracker never interpolates across it (sim/metrics/pulse-tracker.ts).
 * 2. Smoothing (optional): centred moving average over w frames (w odd), taken
 *    only over frames of the same gap-free segment; near a segment end the
 *    window is truncated to the frames available (common practice).
 * 3. Background b per cell: none (0), an entered value, or "preInput" = the
 *    median of the cell's (smoothed) values before the first input pulse; cells
 *    with no such frame take the median of the other cells' backgrounds.
 * 4. Scale s (trace units per molecule): entered, or fitted from the plateau of
 *    long pulses: for each cell the median of (value - b) over the second half of
 *    every pulse at least minPulseMinutes long; s = median over cells /
 *    onSteadyStateMolecules (the model's ON steady state). The plateau method
 *    assumes the reporter reaches steady state within half a long pulse.
 *
 * The threshold in trace units for a cell is then b + s x theta (theta in
 * molecules), with the down level b + s x theta x (1 - h).
 *
 * Pure and deterministic.
 */
import type { Background, Scale, Smoothing, TracePulse } from "@/shared/schemas/api-traces";

export interface RawCell {
  cell: string;
  times: ArrayLike<number>;
  values: ArrayLike<number>;
}

export interface PreparedCell {
  cell: string;
  /** Minutes; NaN-valued samples mark gaps. */
  times: Float64Array;
  values: Float64Array;
  /** Valid samples (without gap markers). */
  points: number;
  gaps: number;
  background: number;
}

export interface PrepareOptions {
  background: Background;
  smoothing: Smoothing;
  gapFactor: number;
}

export interface PreparedSet {
  frameIntervalMinutes: number;
  cells: PreparedCell[];
}

function median(xs: number[]): number {
  if (xs.length === 0) return NaN;
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/** Median of all positive spacings between consecutive frames (minutes); 1 when there are none. */
export function typicalFrameInterval(cells: readonly RawCell[]): number {
  const d: number[] = [];
  for (const c of cells)
    for (let i = 1; i < c.times.length; i++) if (c.times[i] > c.times[i - 1]) d.push(c.times[i] - c.times[i - 1]);
  const m = median(d);
  return Number.isFinite(m) && m > 0 ? m : 1;
}

/** Splits a cell into gap-free segments: [start, end) index ranges. */
export function segmentsOf(times: ArrayLike<number>, maxSpacing: number): [number, number][] {
  const out: [number, number][] = [];
  let start = 0;
  for (let i = 1; i < times.length; i++) {
    if (times[i] - times[i - 1] > maxSpacing) {
      out.push([start, i]);
      start = i;
    }
  }
  if (times.length > 0) out.push([start, times.length]);
  return out;
}

/** Centred moving average of odd width w within [start, end), truncated at the ends. */
export function movingAverage(
  values: ArrayLike<number>,
  start: number,
  end: number,
  w: number,
  out: Float64Array,
): void {
  const half = (w - 1) >> 1;
  for (let i = start; i < end; i++) {
    const a = Math.max(start, i - half);
    const b = Math.min(end - 1, i + half);
    let s = 0;
    for (let k = a; k <= b; k++) s += values[k];
    out[i] = s / (b - a + 1);
  }
}

export function prepareCells(
  cells: readonly RawCell[],
  firstPulseOn: number | null,
  opts: PrepareOptions,
): PreparedSet {
  const frame = typicalFrameInterval(cells);
  const maxSpacing = opts.gapFactor * frame;
  const smoothed = cells.map((c) => {
    const v = Float64Array.from(c.values as ArrayLike<number>);
    const segs = segmentsOf(c.times, maxSpacing);
    if (opts.smoothing.mode === "movingAverage") {
      const out = new Float64Array(v.length);
      for (const [a, b] of segs) movingAverage(c.values, a, b, opts.smoothing.widthFrames, out);
      return { v: out, segs };
    }
    return { v, segs };
  });

  // background per cell
  let bg: number[];
  if (opts.background.mode === "none") bg = cells.map(() => 0);
  else if (opts.background.mode === "value") bg = cells.map(() => (opts.background as { value: number }).value);
  else {
    const own = cells.map((c, k) => {
      const pre: number[] = [];
      for (let i = 0; i < c.times.length; i++)
        if (firstPulseOn === null || c.times[i] < firstPulseOn) pre.push(smoothed[k].v[i]);
      return median(pre);
    });
    const fallback = median(own.filter(Number.isFinite));
    bg = own.map((b) => (Number.isFinite(b) ? b : Number.isFinite(fallback) ? fallback : 0));
  }

  const prepared = cells.map((c, k) => {
    const { v, segs } = smoothed[k];
    const n = c.times.length + segs.length - 1;
    const times = new Float64Array(Math.max(n, 0));
    const values = new Float64Array(Math.max(n, 0));
    let j = 0;
    segs.forEach(([a, b], s) => {
      if (s > 0) {
        // gap marker halfway through the gap
        times[j] = (c.times[a - 1] + c.times[a]) / 2;
        values[j] = NaN;
        j++;
      }
      for (let i = a; i < b; i++) {
        times[j] = c.times[i];
        values[j] = v[i];
        j++;
      }
    });
    return { cell: c.cell, times, values, points: c.times.length, gaps: segs.length - 1, background: bg[k] };
  });
  return { frameIntervalMinutes: frame, cells: prepared };
}

/**
 * Scale factor (trace units per molecule) and a note on how it was obtained.
 * fitPlateau: see the file comment; throws a RangeError when no pulse is long
 * enough or the plateau is not above background.
 */
export function resolveScale(
  scale: Scale,
  cells: readonly PreparedCell[],
  pulses: readonly TracePulse[],
): { unitsPerMolecule: number; note: string } {
  if (scale.mode === "entered")
    return { unitsPerMolecule: scale.unitsPerMolecule, note: `entered: ${scale.unitsPerMolecule} units per molecule` };
  const long = pulses.filter((p) => p.off - p.on >= scale.minPulseMinutes);
  if (long.length === 0)
    throw new RangeError(
      `no input pulse is at least ${scale.minPulseMinutes} min long to fit the scale from its plateau`,
    );
  const perCell: number[] = [];
  for (const c of cells) {
    const xs: number[] = [];
    for (const p of long) {
      const from = (p.on + p.off) / 2;
      for (let i = 0; i < c.times.length; i++) {
        const v = c.values[i];
        if (c.times[i] >= from && c.times[i] < p.off && v === v) xs.push(v - c.background);
      }
    }
    if (xs.length) perCell.push(median(xs));
  }
  const plateau = median(perCell);
  if (!(plateau > 0))
    throw new RangeError("the plateau of long pulses is not above background; enter the scale instead");
  const s = plateau / scale.onSteadyStateMolecules;
  return {
    unitsPerMolecule: s,
    note: `fitted from the plateau of ${long.length} pulse${long.length === 1 ? "" : "s"} of at least ${scale.minPulseMinutes} min over ${perCell.length} cells: median plateau ${fmt(plateau)} units above background / ${fmt(scale.onSteadyStateMolecules)} molecules`,
  };
}

function fmt(x: number): string {
  return String(Number(x.toPrecision(4)));
}
