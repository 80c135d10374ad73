/**
 * The one settings block of a run (docs/metrics.md, "Settings"): threshold and
 * where it came from, hysteresis, window, end time, grid step, method label,
 * seed and replicate count, with the threshold's warnings. Built from the run
 * spec and its resolved threshold (sim/engine/resolve-threshold.ts), so every
 * place that shows settings shows the same numbers.
 *
 * @example runSettingsBlock(spec, resolveThreshold(spec)).method.accuracy // "exact"
 */
import type { RunSettingsBlock } from "@/shared/schemas/analysis";
import type { RunSpec } from "@/shared/schemas/run-spec";
import type { ResolvedThreshold } from "@/sim/engine/resolve-threshold";
import { methodLabel } from "./method-label";

const finite = (x: number): number | null => (Number.isFinite(x) ? x : null);

export function runSettingsBlock(spec: RunSpec, t: ResolvedThreshold): RunSettingsBlock {
  const output = spec.circuit.outputSpecies;
  return {
    thresholdMolecules: finite(t.theta),
    downThresholdMolecules: finite(t.downTheta),
    thresholdSource: t.thresholdSource,
    thresholdRule: t.rule,
    offSteadyStateMolecules: finite(t.offSteadyState),
    onMaximumMolecules: finite(t.onMaximum),
    hysteresis: t.hysteresis,
    windowMinutes: t.windowMinutes,
    windowSource: t.windowSource,
    outputLifetimeMinutes: finite(t.outputLifetimeMinutes),
    noiseDurationMinutes: spec.threshold?.noiseDurationMinutes ?? 10,
    endTimeMinutes: spec.endTimeMinutes,
    gridStepMinutes: spec.gridStepMinutes,
    method: methodLabel(spec.method ?? "direct"),
    seed: spec.seed,
    replicates: spec.replicates,
    outputSpecies: output,
    warnings: [...t.warnings],
  };
}
