/**
 * Expected number of reaction firings of a run, for cost estimates: the
 * integral of the total mean-field rate along the ODE path (burn-in included),
 * times the number of replicates. Exact in expectation for linear circuits;
 * within a factor 2 on the templates (tested).
 */
import type { RunSpec } from "@/shared/schemas/run-spec";
import { solveOde } from "@/sim/ode/solve-ode";
import { runSetup } from "./run-setup";

export function estimateEvents(spec: RunSpec): number {
  const s = solveOde(spec, { relTol: 1e-6, absTol: 1e-6 });
  return (s.totalRateIntegral + s.burnInRateIntegral) * runSetup(spec).spec.replicates;
}
