/** Builders from API data to ChartSpecs (no drawing here). */
import type { Palette } from "@/components/theme/tokens";
import type { ChartRow, ChartSpec } from "./chart-spec";
import { formatNumber } from "./chart-spec";
import type { RunSummary, Comparison } from "@/shared/schemas/analysis";
import type { RunSeries } from "@/shared/schemas/api-runs";
import type { PreviewProgramResponse } from "@/shared/schemas/api-programs";

/** Step samples of a piecewise-constant signal from [on, off) pulses, on a grid of `times`. */
export function signalOnGrid(times: number[], pulses: { on: number; off: number; level: number }[]): number[] {
  return times.map((t) => {
    let v = 0;
    for (const p of pulses) if (t >= p.on && t < p.off) v = Math.max(v, p.level);
    return v;
  });
}

/** The preview of an input program: the signal level over time (a step plot). */
export function programPreviewSpec(preview: PreviewProgramResponse, c: Palette): ChartSpec {
  const rows: ChartRow[] = [{ x: 0, level: preview.levels[0] ?? 0 }];
  const end = preview.endTimeMinutes;
  // Two points per switch give vertical edges with a linear curve.
  let prev = preview.levels.length ? preview.levels[0] : 0;
  rows.length = 0;
  rows.push({ x: 0, level: 0 });
  const switches = preview.switchTimes.map((t, i) => ({ t, level: preview.levels[i] }));
  for (const s of switches) {
    if (s.t > end) break;
    rows.push({ x: s.t, level: prev });
    rows.push({ x: s.t, level: s.level });
    prev = s.level;
  }
  rows.push({ x: end, level: prev });
  const n = preview.pulses.length;
  const durations = [...new Set(preview.pulses.map((p) => Math.round((p.off - p.on) * 100) / 100))].sort(
    (a, b) => a - b,
  );
  return {
    title: "Input signal preview",
    description: `${n} pulse${n === 1 ? "" : "s"} before ${formatNumber(end)} minutes; durations ${durations
      .slice(0, 8)
      .map((d) => formatNumber(d))
      .join(", ")}${durations.length > 8 ? "…" : ""} minutes.`,
    xLabel: "Time (min)",
    yLabel: "Signal level",
    rows,
    layers: [
      { type: "area", key: "level", color: c.series[0], opacity: 0.25 },
      { type: "line", key: "level", color: c.series[0], width: 2 },
    ],
    legend: [{ label: "Input signal", color: c.series[0] }],
    xDomain: [0, end],
    height: 160,
  };
}

/** Logistic pass probability at duration d from the fitted intercept and slope per ln-minute. */
function logisticAt(summary: RunSummary, d: number): number | null {
  const { intercept, slopePerLogMinute, converged } = summary.logistic;
  if (!converged || intercept === null || slopePerLogMinute === null || d <= 0) return null;
  return 1 / (1 + Math.exp(-(intercept + slopePerLogMinute * Math.log(d))));
}

/** Filter curve: pass probability per input pulse duration with Wilson 95% band and the logistic fit. */
export function filterCurveSpec(summary: RunSummary, c: Palette): ChartSpec {
  const entries = summary.byDuration.filter((e) => e.passProbability !== null && e.duration > 0);
  const hasFit = entries.some((e) => logisticAt(summary, e.duration) !== null);
  const rows: ChartRow[] = entries.map((e) => ({
    x: e.duration,
    pass: e.passProbability,
    lo: e.ci ? e.ci[0] : e.passProbability,
    hi: e.ci ? e.ci[1] : e.passProbability,
    ...(hasFit ? { fit: logisticAt(summary, e.duration) } : {}),
  }));
  const d50 = summary.d50 === null ? (summary.d50Note ?? "d50 not estimable") : `d50 ${formatNumber(summary.d50)} min`;
  const logX =
    entries.length > 1 && entries[0].duration > 0 && entries[entries.length - 1].duration / entries[0].duration >= 8;
  return {
    title: "Filter curve",
    description: `Pass probability for ${entries.length} input durations, from ${entries.map((e) => `${formatNumber(e.duration)} min: ${formatNumber((e.passProbability ?? 0) * 100, 3)}%`).join("; ")}. ${d50}.`,
    xLabel: logX ? "Input pulse duration (min, log scale)" : "Input pulse duration (min)",
    yLabel: "Pass probability",
    rows,
    layers: [
      { type: "band", lower: "lo", upper: "hi", color: c.series[0], opacity: 0.2 },
      ...(hasFit
        ? [{ type: "line" as const, key: "fit", color: c.series[1], width: 2, curve: "monotoneX" as const }]
        : []),
      { type: "line", key: "pass", color: c.series[0], width: 1.5, opacity: 0.6 },
      { type: "points", key: "pass", color: c.series[0], radius: 4 },
    ],
    legend: [
      { label: "Pass probability", color: c.series[0] },
      { label: "Wilson 95% band", color: c.primarySoft },
      ...(hasFit ? [{ label: "Logistic fit", color: c.series[1] }] : []),
    ],
    yDomain: [0, 1],
    logX,
    height: 240,
  };
}

/** Thins a series to at most maxPoints by taking every k-th point (keeps the last). */
function thinIndices(n: number, maxPoints: number): number[] {
  if (n <= maxPoints) return Array.from({ length: n }, (_, i) => i);
  const step = Math.ceil(n / maxPoints);
  const out: number[] = [];
  for (let i = 0; i < n; i += step) out.push(i);
  if (out[out.length - 1] !== n - 1) out.push(n - 1);
  return out;
}

/** Mean output with a ±1 SD band, the ODE solution, and the input signal scaled to the plot. */
export function meanBandSpec(series: RunSeries, c: Palette): ChartSpec | null {
  const out = series.species.find((s) => s.name === series.outputSpecies) ?? series.species[0];
  if (!out || series.times.length === 0) return null;
  const idx = thinIndices(series.times.length, 400);
  const top = Math.max(1, ...idx.map((i) => out.mean[i] + out.sd[i]), ...(out.ode ? idx.map((i) => out.ode![i]) : []));
  const input = signalOnGrid(series.times, series.input.pulses);
  const inputMax = Math.max(1e-9, ...input);
  const rows: ChartRow[] = idx.map((i) => ({
    x: series.times[i],
    mean: out.mean[i],
    lo: Math.max(0, out.mean[i] - out.sd[i]),
    hi: out.mean[i] + out.sd[i],
    ...(out.ode ? { ode: out.ode[i] } : {}),
    input: (input[i] / inputMax) * top * 0.25,
  }));
  return {
    title: `Mean ${out.name} with SD band`,
    description: `Mean of ${out.name} over replicates, shaded one standard deviation either side${out.ode ? ", with the deterministic (ODE) solution" : ""}; the input signal is drawn at the bottom, scaled.`,
    xLabel: "Time (min)",
    yLabel: `${out.name} (molecules)`,
    rows,
    layers: [
      { type: "area", key: "input", color: c.series[2], opacity: 0.18, curve: "stepAfter" },
      { type: "band", lower: "lo", upper: "hi", color: c.series[0], opacity: 0.2 },
      { type: "line", key: "mean", color: c.series[0], width: 2 },
      ...(out.ode ? [{ type: "line" as const, key: "ode", color: c.series[1], width: 1.5 }] : []),
    ],
    legend: [
      { label: "Mean", color: c.series[0] },
      { label: "±1 SD", color: c.primarySoft },
      ...(out.ode ? [{ label: "ODE", color: c.series[1] }] : []),
      { label: "Input (scaled)", color: c.series[2] },
    ],
    height: 240,
  };
}

/** A few sample trajectories of the output over the input signal, with the threshold. */
export function trajectoriesSpec(series: RunSeries, c: Palette, maxTrajectories = 4): ChartSpec | null {
  const trajs = series.trajectories.slice(0, maxTrajectories).filter((t) => t.values[series.outputSpecies]);
  if (!trajs.length) return null;
  const idx = thinIndices(series.times.length, 400);
  let top = 1;
  for (const t of trajs) for (const i of idx) top = Math.max(top, t.values[series.outputSpecies][i] ?? 0);
  const input = signalOnGrid(series.times, series.input.pulses);
  const inputMax = Math.max(1e-9, ...input);
  const rows: ChartRow[] = idx.map((i) => {
    const r: ChartRow = { x: series.times[i], input: (input[i] / inputMax) * top * 0.25 };
    trajs.forEach((t, k) => (r[`r${k}`] = t.values[series.outputSpecies][i] ?? null));
    if (series.threshold) r.theta = series.threshold.theta;
    return r;
  });
  const colors = [c.series[0], c.series[3], c.series[4], c.series[5]];
  return {
    title: `Sample trajectories of ${series.outputSpecies}`,
    description: `${trajs.length} simulated replicates of ${series.outputSpecies} over time, with the input pulses drawn at the bottom${series.threshold ? ` and the threshold at ${formatNumber(series.threshold.theta)} molecules` : ""}.`,
    xLabel: "Time (min)",
    yLabel: `${series.outputSpecies} (molecules)`,
    rows,
    layers: [
      { type: "area", key: "input", color: c.series[2], opacity: 0.18, curve: "stepAfter" },
      ...trajs.map((_, k) => ({
        type: "line" as const,
        key: `r${k}`,
        color: colors[k % colors.length],
        width: 1.25,
        curve: "stepAfter" as const,
      })),
      ...(series.threshold ? [{ type: "line" as const, key: "theta", color: c.series[1], width: 1 }] : []),
    ],
    legend: [
      ...trajs.map((t, k) => ({ label: `Replicate ${t.replicate}`, color: colors[k % colors.length] })),
      ...(series.threshold ? [{ label: "Threshold", color: c.series[1] }] : []),
      { label: "Input (scaled)", color: c.series[2] },
    ],
    height: 240,
  };
}

/** Histogram of observed response delays; censored pulses are stated in the description. */
export function delayHistogramSpec(summary: RunSummary, c: Palette): ChartSpec | null {
  const h = summary.delay.histogram;
  if (!h.counts.length) return null;
  const rows: ChartRow[] = h.counts.map((n, k) => ({ x: (h.edges[k] + h.edges[k + 1]) / 2, count: n }));
  return {
    title: "Response delay histogram",
    description: `${summary.delay.responded} responses in ${h.counts.length} bins from ${formatNumber(h.edges[0])} to ${formatNumber(h.edges[h.edges.length - 1])} minutes; ${summary.delay.censored} pulses had no response in their window (not drawn). Median delay ${formatNumber(summary.delay.median)} min.`,
    xLabel: "Response delay (min)",
    yLabel: "Pulses",
    rows,
    layers: [{ type: "bars", key: "count", color: c.series[0] }],
    legend: [{ label: `Observed delays (${summary.delay.censored} censored not shown)`, color: c.series[0] }],
    yDomain: [0, Math.max(1, ...h.counts)],
    height: 200,
  };
}

/** Filter curves of 2-4 runs overlaid. */
export function compareFilterSpec(cmp: Comparison, c: Palette): ChartSpec {
  const rows: ChartRow[] = cmp.filterCurves.map((fc) => {
    const r: ChartRow = { x: fc.duration };
    fc.runs.forEach((e, k) => (r[`p${k}`] = e?.passProbability ?? null));
    return r;
  });
  const xs = cmp.filterCurves.map((f) => f.duration).filter((d) => d > 0);
  const logX = xs.length > 1 && xs[xs.length - 1] / xs[0] >= 8;
  return {
    title: "Filter curves compared",
    description: cmp.runs
      .map(
        (r, k) =>
          `${r.name}: ${cmp.filterCurves.map((f) => `${formatNumber(f.duration)} min ${f.runs[k]?.passProbability === null || f.runs[k] === null ? "–" : formatNumber((f.runs[k]!.passProbability ?? 0) * 100) + "%"}`).join(", ")}`,
      )
      .join(". "),
    xLabel: logX ? "Input pulse duration (min, log scale)" : "Input pulse duration (min)",
    yLabel: "Pass probability",
    rows: rows.filter((r) => r.x > 0),
    layers: cmp.runs.flatMap((_, k) => [
      { type: "line" as const, key: `p${k}`, color: c.series[k], width: 2 },
      { type: "points" as const, key: `p${k}`, color: c.series[k], radius: 4 },
    ]),
    legend: cmp.runs.map((r, k) => ({ label: r.name, color: c.series[k] })),
    yDomain: [0, 1],
    logX,
    height: 240,
  };
}

/** Delay distributions of 2-4 runs on shared bins (as fractions, so run sizes compare). */
export function compareDelaySpec(cmp: Comparison, c: Palette): ChartSpec | null {
  const d = cmp.distributions.delays;
  if (d.edges.length < 2) return null;
  const rows: ChartRow[] = d.edges.slice(0, -1).map((e, k) => {
    const r: ChartRow = { x: (e + d.edges[k + 1]) / 2 };
    d.runs.forEach((run, j) => {
      const total = run.counts.reduce((a, b) => a + b, 0);
      r[`f${j}`] = total ? run.counts[k] / total : 0;
    });
    return r;
  });
  return {
    title: "Response delays compared",
    description:
      cmp.runs.map((r, j) => `${r.name}: ${d.runs[j].censored} censored`).join("; ") +
      ". Fractions of observed delays per bin.",
    xLabel: "Response delay (min)",
    yLabel: "Fraction of responses",
    rows,
    layers: cmp.runs.map((_, j) => ({
      type: "line" as const,
      key: `f${j}`,
      color: c.series[j],
      width: 2,
      curve: "stepAfter" as const,
    })),
    legend: cmp.runs.map((r, j) => ({ label: r.name, color: c.series[j] })),
    height: 200,
  };
}
