/**
 * Matching observed single-cell figures to simulated ones (docs/traces.md).
 *
 * Summary of a set of pulse records (excluded pulses left out, as everywhere):
 * pass rate per duration bin, response delays of passed pulses, output pulse
 * widths. Censored delays (no response) are not mixed with observed ones: the
 * pass rate carries them, and delays are compared among passed pulses only.
 *
 * Distances between an observed and a simulated summary:
 * - pass: sum over observed duration bins that the simulation also has (same
 *   duration within max(0.5 min, 2%)) of w_b |p_obs(b) - p_sim(b)|, with w_b the
 *   observed share of pulses in bin b; the pooled rates when no bin is shared;
 * - delayKs, widthKs: two-sample Kolmogorov-Smirnov statistic D (Smirnov 1948);
 *   0 when both samples are empty, 1 when only one is;
 * - delayW1Minutes, widthW1Minutes: Wasserstein-1 distances in minutes
 *   (reported, and used to break ties);
 * - combined = pass + delayKs + widthKs: each term is a difference of
 *   probabilities in [0, 1], so no unit decides the ranking; range [0, 3].
 *
 * ABC rejection (Pritchard et al. 1999, Mol Biol Evol 16:1791): points of a
 * sweep are ranked by the combined distance (ties broken by the sum of the W1
 * distances, then by point order) and accepted when within the tolerance fixed
 * before matching: the closest `fraction` of points (ceil(fraction x N), at
 * least 1), or every point with combined distance <= `distance`. The accept
 * set's parameter ranges approximate the region of parameter space consistent
 * with the data under the flat prior the sweep grid represents.
 */
import type { PulseStat } from "@/shared/schemas/run-spec";
import type { Distances, MatchPoint, MatchResult, Tolerance } from "@/shared/schemas/api-traces";
import { ks2 } from "@/sim/stats/ks-two-sample";
import { wasserstein1 } from "@/sim/stats/wasserstein-1";

export interface FigureSummary {
  /** durationBin -> [pulses, passed] */
  bins: Map<number, [number, number]>;
  pulses: number;
  passed: number;
  delays: number[];
  widths: number[];
}

/** Builds the summary from pulse records (excluded pulses left out). */
export function summarizeFigures(records: Iterable<PulseStat>): FigureSummary {
  const s: FigureSummary = { bins: new Map(), pulses: 0, passed: 0, delays: [], widths: [] };
  for (const p of records) addRecord(s, p);
  return s;
}

/** Adds one record to a summary (for streaming over database rows). */
export function addRecord(
  s: FigureSummary,
  p: Pick<PulseStat, "excluded" | "passed" | "delay" | "widths" | "durationBin">,
): void {
  if (p.excluded) return;
  s.pulses++;
  let b = s.bins.get(p.durationBin);
  if (!b) s.bins.set(p.durationBin, (b = [0, 0]));
  b[0]++;
  if (p.passed) {
    s.passed++;
    b[1]++;
    if (p.delay !== null && Number.isFinite(p.delay)) s.delays.push(p.delay);
  }
  for (const w of p.widths) if (Number.isFinite(w)) s.widths.push(w);
}

function sameBin(a: number, b: number): boolean {
  return Math.abs(a - b) <= Math.max(0.5, 0.02 * Math.max(Math.abs(a), Math.abs(b)));
}

/** Weighted pass-rate distance (see the file comment). */
export function passDistance(obs: FigureSummary, sim: FigureSummary): number {
  if (obs.pulses === 0 && sim.pulses === 0) return 0;
  if (obs.pulses === 0 || sim.pulses === 0) return 1;
  let weight = 0;
  let total = 0;
  const simBins = [...sim.bins.entries()];
  for (const [bin, [n, k]] of obs.bins) {
    let best: [number, number] | null = null;
    let bestGap = Infinity;
    for (const [sb, counts] of simBins) {
      const gap = Math.abs(sb - bin);
      if (sameBin(sb, bin) && gap < bestGap) {
        best = counts;
        bestGap = gap;
      }
    }
    if (!best || best[0] === 0) continue;
    weight += n;
    total += n * Math.abs(k / n - best[1] / best[0]);
  }
  if (weight === 0) return Math.abs(obs.passed / obs.pulses - sim.passed / sim.pulses);
  return total / weight;
}

function ksOrEdge(a: number[], b: number[]): number {
  if (a.length === 0 && b.length === 0) return 0;
  if (a.length === 0 || b.length === 0) return 1;
  return ks2(a, b).d;
}

function w1OrNull(a: number[], b: number[]): number | null {
  if (a.length === 0 || b.length === 0) return null;
  return wasserstein1(a, b);
}

export function figureDistances(obs: FigureSummary, sim: FigureSummary): Distances {
  const pass = passDistance(obs, sim);
  const delayKs = ksOrEdge(obs.delays, sim.delays);
  const widthKs = ksOrEdge(obs.widths, sim.widths);
  return {
    pass,
    delayKs,
    delayW1Minutes: w1OrNull(obs.delays, sim.delays),
    widthKs,
    widthW1Minutes: w1OrNull(obs.widths, sim.widths),
    combined: pass + delayKs + widthKs,
  };
}

export interface CandidatePoint {
  runId: string;
  sweepPoint: number | null;
  parameters: Record<string, number>;
  figures: FigureSummary;
}

/** Sorted values and pass rate of a summary, for overlay charts (at most maxValues per list, evenly thinned). */
export function distributionOf(s: FigureSummary, maxValues = 2000) {
  const thin = (xs: number[]) => {
    const sorted = [...xs].sort((a, b) => a - b);
    if (sorted.length <= maxValues) return sorted;
    const out: number[] = [];
    for (let i = 0; i < maxValues; i++) out.push(sorted[Math.floor((i * (sorted.length - 1)) / (maxValues - 1))]);
    return out;
  };
  return {
    passRate: s.pulses ? s.passed / s.pulses : null,
    delays: thin(s.delays),
    widths: thin(s.widths),
    n: s.pulses,
  };
}

/** How many points a fraction tolerance accepts out of n. */
export function acceptCount(fraction: number, n: number): number {
  return Math.min(n, Math.max(1, Math.ceil(fraction * n - 1e-9)));
}

/**
 * Ranks candidate points by distance to the observed figures and applies the
 * ABC rejection tolerance. `axes` lists the swept parameters (for the ranges).
 */
export function matchPoints(
  observed: FigureSummary,
  candidates: readonly CandidatePoint[],
  tolerance: Tolerance,
  axes: readonly string[] = [],
  skippedRuns: MatchResult["skippedRuns"] = [],
): MatchResult {
  const scored = candidates.map((c, order) => ({ c, order, d: figureDistances(observed, c.figures) }));
  const w1 = (d: Distances) => (d.delayW1Minutes ?? 0) + (d.widthW1Minutes ?? 0);
  scored.sort((a, b) => a.d.combined - b.d.combined || w1(a.d) - w1(b.d) || a.order - b.order);
  const n = scored.length;
  let accepted: number;
  let acceptDistance: number;
  if (n === 0) {
    accepted = 0;
    acceptDistance = NaN;
  } else if (tolerance.kind === "fraction") {
    accepted = acceptCount(tolerance.fraction, n);
    acceptDistance = scored[accepted - 1].d.combined;
  } else {
    accepted = scored.filter((s) => s.d.combined <= tolerance.distance).length;
    acceptDistance = tolerance.distance;
  }
  const points: MatchPoint[] = scored.map((s, i) => ({
    runId: s.c.runId,
    sweepPoint: s.c.sweepPoint,
    parameters: s.c.parameters,
    distances: s.d,
    rank: i + 1,
    accepted: i < accepted,
  }));
  const ranges = axes.map((parameter) => {
    const all = points.map((p) => p.parameters[parameter]).filter((x) => Number.isFinite(x));
    const acc = points
      .filter((p) => p.accepted)
      .map((p) => p.parameters[parameter])
      .filter((x) => Number.isFinite(x));
    return {
      parameter,
      acceptedMin: acc.length ? Math.min(...acc) : null,
      acceptedMax: acc.length ? Math.max(...acc) : null,
      sweptMin: all.length ? Math.min(...all) : null,
      sweptMax: all.length ? Math.max(...all) : null,
    };
  });
  return {
    tolerance,
    acceptDistance: Number.isFinite(acceptDistance) ? acceptDistance : null,
    pointCount: n,
    acceptedCount: accepted,
    points,
    ranges,
    observed: distributionOf(observed),
    bestSimulated: n ? distributionOf(scored[0].c.figures) : null,
    notes: [],
    skippedRuns,
  };
}
