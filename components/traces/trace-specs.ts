/** ChartSpecs for traces (plain data; drawn by the lazy chart). */
import type { Palette } from "@/components/theme/tokens";
import type { ChartRow, ChartSpec } from "@/components/charts/chart-spec";
import { formatNumber, formatQuantity } from "@/shared/number-format";
import { signalOnGrid } from "@/components/charts/specs";
import type { TracePulse } from "@/shared/schemas/api-traces";

type ChartCell = { cell: string; times: number[]; values: (number | null)[] };

/** Every k-th of the sorted values so at most maxPoints remain (first and last kept). */
function thin(xs: number[], maxPoints: number): number[] {
  if (xs.length <= maxPoints) return xs;
  const step = Math.ceil(xs.length / maxPoints);
  const out: number[] = [];
  for (let i = 0; i < xs.length; i += step) out.push(xs[i]);
  if (out[out.length - 1] !== xs[xs.length - 1]) out.push(xs[xs.length - 1]);
  return out;
}

/**
 * A few cells over the input schedule (drawn at the bottom, scaled), with the
 * median threshold in trace units when given. Cells keep their own frames;
 * missing frames and gaps break the line.
 */
export function cellsOverScheduleSpec(
  cells: ChartCell[],
  schedule: TracePulse[],
  c: Palette,
  opts: { maxCells?: number; thresholdTraceUnits?: number | null; title?: string } = {},
): ChartSpec | null {
  const shown = cells.slice(0, opts.maxCells ?? 5).filter((x) => x.times.length > 0);
  if (!shown.length) return null;
  const lookups = shown.map((cell) => {
    const m = new Map<number, number | null>();
    cell.times.forEach((t, i) => m.set(t, cell.values[i] ?? null));
    return m;
  });
  const grid = thin(
    [...new Set(shown.flatMap((x) => x.times))].sort((a, b) => a - b),
    600,
  );
  let top = 1;
  for (const cell of shown) for (const v of cell.values) if (v !== null && Number.isFinite(v)) top = Math.max(top, v);
  const input = signalOnGrid(
    grid,
    schedule.map((p) => ({ on: p.on, off: p.off, level: 1 })),
  );
  const threshold = opts.thresholdTraceUnits ?? null;
  const rows: ChartRow[] = grid.map((x, i) => {
    const r: ChartRow = { x, input: input[i] * top * 0.25 };
    lookups.forEach((m, k) => {
      const v = m.get(x);
      r[`c${k}`] = v === undefined || v === null || !Number.isFinite(v) ? null : v;
    });
    if (threshold !== null) r.theta = threshold;
    return r;
  });
  const colors = [c.series[0], c.series[3], c.series[4], c.series[5], c.series[2]];
  const span = [grid[0], grid[grid.length - 1]];
  return {
    title: opts.title ?? "Sample cells over the input schedule",
    description: `${shown.length} cells (${shown.map((x) => x.cell).join(", ")}) from ${formatNumber(span[0])} to ${formatQuantity(span[1], "minutes")}, with ${schedule.length} input pulses drawn at the bottom${threshold !== null ? ` and the median threshold at ${formatNumber(threshold)} trace units` : ""}.`,
    xLabel: "Time (min)",
    yLabel: "Reporter (trace units)",
    rows,
    layers: [
      { type: "area", key: "input", color: c.series[2], opacity: 0.18, curve: "stepAfter" },
      ...shown.map((_, k) => ({ type: "line" as const, key: `c${k}`, color: colors[k % colors.length], width: 1.25 })),
      ...(threshold !== null ? [{ type: "line" as const, key: "theta", color: c.series[1], width: 1 }] : []),
    ],
    legend: [
      ...shown.map((x, k) => ({ label: x.cell, color: colors[k % colors.length] })),
      ...(threshold !== null ? [{ label: "Threshold (median over cells)", color: c.series[1] }] : []),
      { label: "Input (scaled)", color: c.series[2] },
    ],
    height: 240,
  };
}

/** Fraction of the sorted sample at or below x. */
function ecdfAt(sorted: number[], x: number): number {
  let lo = 0,
    hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (sorted[mid] <= x) lo = mid + 1;
    else hi = mid;
  }
  return lo / sorted.length;
}

/**
 * Observed against simulated values as two cumulative distributions (the
 * picture behind the Kolmogorov-Smirnov distance: its largest vertical gap).
 */
export function distributionOverlaySpec(
  observed: number[],
  simulated: number[],
  c: Palette,
  what: { title: string; quantity: string; ks: number; w1: number | null; simulatedLabel?: string },
): ChartSpec | null {
  if (!observed.length || !simulated.length) return null;
  const obs = [...observed].sort((a, b) => a - b);
  const sim = [...simulated].sort((a, b) => a - b);
  const grid = thin(
    [...new Set([...obs, ...sim])].sort((a, b) => a - b),
    400,
  );
  const rows: ChartRow[] = grid.map((x) => ({ x, obs: ecdfAt(obs, x), sim: ecdfAt(sim, x) }));
  const med = (s: number[]) => s[Math.floor((s.length - 1) / 2)];
  return {
    title: what.title,
    description: `Cumulative share of ${what.quantity} up to each value: ${obs.length} observed (median ${formatQuantity(med(obs), "min")}) against ${sim.length} simulated (median ${formatQuantity(med(sim), "min")}). Largest gap between the curves ${formatNumber(what.ks, 2)}${what.w1 !== null ? `; average shift ${formatQuantity(what.w1, "min")}` : ""}.`,
    xLabel: `${what.quantity[0].toUpperCase()}${what.quantity.slice(1)} (min)`,
    yLabel: "Share at or below",
    rows,
    layers: [
      { type: "line", key: "obs", color: c.series[0], width: 2, curve: "stepAfter" },
      { type: "line", key: "sim", color: c.series[1], width: 2, curve: "stepAfter" },
    ],
    legend: [
      { label: `Observed (${obs.length})`, color: c.series[0] },
      { label: `${what.simulatedLabel ?? "Simulated"} (${sim.length})`, color: c.series[1] },
    ],
    yDomain: [0, 1],
    height: 200,
  };
}
