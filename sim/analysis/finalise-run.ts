/**
 * The one finalisation of a run, shared by the command-line simulator and the
 * server's finalisation worker: from a run's spec, its per-pulse records and its
 * per-replicate totals, the mean-field (ODE) overlay (or the reason it could not be
 * solved), the summary of docs/metrics.md with its settings block, and the behaviour
 * labels of docs/regimes.md (or "unclear" with the reason they could not be given).
 * Callers read and write their own storage (files or SQLite) around it, so the two
 * produce the same figures for the same spec and seed.
 *
 * @example finaliseRun({ spec, pulses, replicates }).summary.d50
 */
import type { RunSummary } from "@/shared/schemas/analysis";
import type { PulseStat, RunSpec } from "@/shared/schemas/run-spec";
import { resolveThreshold, type ResolvedThreshold } from "@/sim/engine/resolve-threshold";
import { runSetup } from "@/sim/engine/run-setup";
import { solveOde } from "@/sim/ode/solve-ode";
import { odeBudget, withOdeBudget } from "@/sim/ode/ode-budget";
import { prepareRunRegime, settleRunRegime, type PreparedRunRegime, type RunRegime } from "@/sim/regimes";
import { replicateFigures, type ReplicateFigures } from "@/sim/regimes/replicate-figures";
import { runSettingsBlock } from "./run-settings";
import type { PulseTable } from "./pulse-table";
import { summarizeRun, type ReplicateTotals, type RunSummaryBuilder } from "./summarize-run";

export interface FinaliseRunInput {
  spec: RunSpec;
  /** As objects or as columns (./pulse-table.ts): the same result either way. */
  pulses: readonly PulseStat[] | PulseTable;
  replicates: readonly ReplicateTotals[];
  /** The threshold the run was tracked with, when the caller already resolved it. */
  threshold?: ResolvedThreshold;
  /**
   * Every record of `pulses`, in order, already added to a summary builder (the server's finalising thread
   * adds each chunk as it is stored): the summary is finished from it, the same bytes as from the records.
   * Used only when it was made for the run's window and end time.
   */
  summaryParts?: RunSummaryBuilder;
}

export interface FinalisedRun {
  threshold: ResolvedThreshold;
  /** Mean-field values on the grid (species-major), or null with odeNote saying why. */
  ode: Float64Array | null;
  odeNote: string | null;
  summary: RunSummary;
  regime: RunRegime;
  /** Compact per-replicate figures for design targets (sim/regimes/replicate-figures.ts). */
  replicateFigures: ReplicateFigures;
}

/**
 * Every ODE solve of the finalisation (the threshold, the overlay, the behaviour labels' steady states,
 * step response and cycle check) counts against one budget for the whole call: the caller's ambient
 * one (the server's finalisation worker sets steps and wall time) or one default budget.
 */
export function finaliseRun(input: FinaliseRunInput): FinalisedRun {
  return withOdeBudget(odeBudget(), () =>
    completeFinaliseUnderBudget(prepareFinaliseUnderBudget(input.spec, input.threshold), input),
  );
}

/**
 * The part of finaliseRun that needs only the spec: the threshold, the ODE overlay and the behaviour labels
 * but for their pass-curve rule (the ensembles: most of the cost), in finaliseRun's order and under one budget
 * (the ambient one or a default), so the server can compute it while the run's replicates are still computing.
 * completeFinalise then gives exactly finaliseRun's result.
 */
export interface PreparedFinalise {
  threshold: ResolvedThreshold;
  ode: Float64Array | null;
  odeNote: string | null;
  regime: PreparedRunRegime | { failed: string };
}

export function prepareFinalise(spec: RunSpec, threshold?: ResolvedThreshold): PreparedFinalise {
  return withOdeBudget(odeBudget(), () => prepareFinaliseUnderBudget(spec, threshold));
}

/** finaliseRun's result from prepareFinalise's (same spec) and the run's records; solves no ODE. */
export function completeFinalise(prepared: PreparedFinalise, input: Omit<FinaliseRunInput, "threshold">): FinalisedRun {
  return completeFinaliseUnderBudget(prepared, input);
}

function prepareFinaliseUnderBudget(spec: RunSpec, given: ResolvedThreshold | undefined): PreparedFinalise {
  const threshold = given ?? resolveThreshold(spec);
  let ode: Float64Array | null = null;
  let odeNote: string | null = null;
  try {
    ode = solveOde(spec).values;
  } catch (e) {
    odeNote = (e as Error).message;
  }
  let regime: PreparedFinalise["regime"];
  try {
    regime = prepareRunRegime(runSetup(spec).model, threshold.theta, {
      seed: spec.seed,
      hysteresis: threshold.hysteresis,
      outputLifetimeMinutes: threshold.outputLifetimeMinutes,
    });
  } catch (e) {
    regime = { failed: `not classified: ${(e as Error).message}` };
  }
  return { threshold, ode, odeNote, regime };
}

function completeFinaliseUnderBudget(
  prepared: PreparedFinalise,
  input: Omit<FinaliseRunInput, "threshold">,
): FinalisedRun {
  const { spec } = input;
  const { threshold, ode, odeNote } = prepared;
  const summaryInput = {
    replicates: input.replicates,
    threshold,
    noiseDurationMinutes: spec.threshold?.noiseDurationMinutes ?? 10,
    endTimeMinutes: spec.endTimeMinutes,
    settings: runSettingsBlock(spec, threshold),
  };
  const parts = input.summaryParts;
  const summary =
    parts && parts.windowMinutes === threshold.windowMinutes && parts.endTimeMinutes === spec.endTimeMinutes
      ? parts.finish(summaryInput)
      : summarizeRun({ pulses: input.pulses, ...summaryInput });
  let regime: RunRegime;
  try {
    if ("failed" in prepared.regime) throw new Error(prepared.regime.failed);
    const passCurve = spec.program
      ? summary.byDuration.map((b) => ({ durationMinutes: b.duration, passed: b.passed, counted: b.pulses }))
      : undefined;
    regime = settleRunRegime(prepared.regime, passCurve);
  } catch (e) {
    const reason = "failed" in prepared.regime ? prepared.regime.failed : `not classified: ${(e as Error).message}`;
    const unclear = { label: "unclear" as const, evidence: {}, reason };
    regime = { deterministic: unclear, stochastic: unclear };
  }
  const perReplicate = replicateFigures(input.pulses, { longMinutes: summary.delayCost?.minDurationMinutes ?? null });
  return { threshold, ode, odeNote, summary, regime, replicateFigures: perReplicate };
}
