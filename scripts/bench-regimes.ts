/**
 * Deterministic-only regime map cost (docs/regimes.md): a 20 x 20 map of the
 * timer ring (three species) over the production rates of its first two
 * genes, 10 to 400 per minute on log grids, mean-field labels only, in this
 * process. Reports wall and CPU seconds and their ratio to the 30 s target.
 */
import { deterministicRegimeMap } from "@/sim/regimes/deterministic-map";
import { feedbackTemplates } from "@/sim/circuit/templates";

export const REGIME_MAP_TARGET_SECONDS = 30;

export interface RegimeMapBench {
  points: number;
  species: number;
  seconds: number;
  cpuSeconds: number;
  targetSeconds: number;
  /** seconds / target (below 1 meets it). */
  ratioToTarget: number;
  labels: Record<string, number>;
}

const logGrid = (from: number, to: number, n: number) =>
  Array.from({ length: n }, (_, i) => from * (to / from) ** (i / (n - 1)));

export function runRegimeMapBench(side = 20): RegimeMapBench {
  const circuit = feedbackTemplates.ring.circuit;
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  const map = deterministicRegimeMap({
    circuit,
    axes: [
      { parameter: "rate(makeA)", values: logGrid(10, 400, side) },
      { parameter: "rate(makeB)", values: logGrid(10, 400, side) },
    ],
  });
  const seconds = (performance.now() - t0) / 1000;
  const c = process.cpuUsage(c0);
  const labels: Record<string, number> = {};
  for (const l of map.labels) labels[l] = (labels[l] ?? 0) + 1;
  return {
    points: map.labels.length,
    species: circuit.species.length,
    seconds,
    cpuSeconds: (c.user + c.system) / 1e6,
    targetSeconds: REGIME_MAP_TARGET_SECONDS,
    ratioToTarget: seconds / REGIME_MAP_TARGET_SECONDS,
    labels,
  };
}
