/**
 * Deterministic behaviour label of a circuit at its parameters (rules and
 * thresholds in docs/regimes.md). Looks at the mean-field model with the
 * signals off and, when the circuit has signals, held on: steady states and
 * their linearisation eigenvalues (./steady-states.ts), a limit cycle by
 * integration where no steady state is stable or a trajectory does not settle
 * (./sustained-cycle.ts), the response to a sustained input from the off state
 * (./step-response.ts), and, when given, the pass curve (./pass-curve-rule.ts).
 *
 * Order of the rules: unclear (no steady state and no cycle) > sustained
 * oscillation > memory > silent > pulse generator > damped oscillation >
 * persistence filter / follower > steady.
 *
 * Example: classifyDeterministic({ model: compileModel(feedbackTemplates.latch.circuit) }).label === "memory".
 */
import type { CompiledModel } from "@/sim/circuit/compile-model";
import { deriveParams } from "@/sim/circuit/compile-model";
import type { PassCurvePending, RegimeVerdict } from "./labels";
import { OdeBudgetError } from "@/sim/ode/ode-budget";
import { findSteadyStates, turnoverMinutes, type SteadyStateSearch } from "./steady-states";
import { measureCycle, type CycleMeasure } from "./sustained-cycle";
import { stepResponse } from "./step-response";
import { settlePassCurve, type PassCurvePoint } from "./pass-curve-rule";
import { meanFieldRhs } from "@/sim/ode/mean-field";

export interface DeterministicInput {
  model: CompiledModel;
  /** Parameter vector (the model's base parameters when absent). */
  params?: Float64Array;
  /** Output threshold in molecules (enables `silent` and the pulse-generator peak check). */
  thresholdMolecules?: number;
  passCurve?: PassCurvePoint[];
}

/** Settling horizon and cycle window, in slowest turnover times. */
export const SETTLE_TURNOVERS = 100;
export const CYCLE_WINDOW_TURNOVERS = 40;
/** A cycle: late relative swing at least this... */
export const MIN_CYCLE_SWING = 1e-3;
/** ...and the late swing at least this fraction of the early one (0.98 when a stable state coexists). */
export const MIN_SWING_RATIO = 0.5;
export const MIN_SWING_RATIO_BESIDE_STABLE = 0.98;
/** Ringing worth the name: successive peaks of the linearised response at least 5% of each other. */
export const MIN_PEAK_RATIO = 0.05;
export const RINGING_IMAG_OVER_REAL = (2 * Math.PI) / Math.log(1 / MIN_PEAK_RATIO);
/** Pulse generator: under a sustained input the output falls to at most this fraction of its peak. */
export const PULSE_FALLBACK_FRACTION = 0.5;

interface Condition {
  name: "off" | "on";
  search: SteadyStateSearch;
  cycle: CycleMeasure | null;
  sustained: boolean;
}

export function classifyDeterministic(input: DeterministicInput): RegimeVerdict {
  return settlePassCurve(classifyDeterministicBeforePassCurve(input), input.passCurve);
}

/** Every rule but the pass curve's and steady's (settlePassCurve adds those): the mean-field work needs no replicates. */
export function classifyDeterministicBeforePassCurve(
  input: Omit<DeterministicInput, "passCurve">,
): RegimeVerdict | PassCurvePending {
  const { model } = input;
  const p = Float64Array.from(input.params ?? model.baseParams);
  deriveParams(model, p);
  const off = Float64Array.from(model.signalOff);
  const on = Float64Array.from(model.signalOn);
  const hasOn = model.nSignals > 0 && on.some((v, i) => v !== off[i]);
  const tau = turnoverMinutes(model, p, off);
  const settle = SETTLE_TURNOVERS * tau;
  const sample = tau / 25;
  const out = model.outputIndex;
  let conditions: Condition[];
  try {
    conditions = (hasOn ? (["off", "on"] as const) : (["off"] as const)).map((name) => {
      const search = findSteadyStates(model, p, name === "off" ? off : on, settle, 1e-6 / tau);
      const stable = search.states.filter((s) => s.stable);
      let cycle: CycleMeasure | null = null;
      if (stable.length === 0 || search.unsettled.length > 0) {
        const from = search.unsettled[0] ?? perturbed(search);
        if (from) cycle = measureCycle(search.rhs, from, CYCLE_WINDOW_TURNOVERS * tau, sample, search.scale);
      }
      const needRatio = stable.length === 0 ? MIN_SWING_RATIO : MIN_SWING_RATIO_BESIDE_STABLE;
      const sustained = !!cycle && cycle.relativeSwing >= MIN_CYCLE_SWING && cycle.swingRatio >= needRatio;
      return { name, search, cycle, sustained };
    });
  } catch (e) {
    // a spent budget is the caller's to report (the run's labels say unclear, a map answers 422)
    if (e instanceof OdeBudgetError) throw e;
    return {
      label: "unclear",
      evidence: { turnoverMinutes: tau },
      reason: `the mean-field model could not be solved: ${(e as Error).message}`,
    };
  }
  const base = { turnoverMinutes: tau };
  const stateEvidence = (c: Condition) => {
    const stable = c.search.states.filter((s) => s.stable);
    const dom = stable[0] ?? c.search.states[0];
    return {
      [`${c.name}SteadyStates`]: c.search.states.length,
      [`${c.name}StableStates`]: stable.length,
      [`${c.name}StableOutputs`]: stable.map((s) => s.state[out]),
      [`${c.name}DominantReal`]: dom ? dom.dominantReal : null,
      [`${c.name}DominantImag`]: dom ? dom.dominantImag : null,
    };
  };
  for (const c of conditions) {
    if (c.sustained && c.cycle) {
      const unstable = c.search.states.find((s) => !s.stable);
      return {
        label: "sustained oscillation",
        evidence: {
          ...base,
          ...stateEvidence(c),
          periodMinutes: c.cycle.periodMinutes,
          relativeSwing: c.cycle.relativeSwing,
          swingRatio: c.cycle.swingRatio,
          unstableDominantReal: unstable ? unstable.dominantReal : null,
          unstableDominantImag: unstable ? unstable.dominantImag : null,
        },
      };
    }
  }
  for (const c of conditions) {
    if (c.search.states.length === 0 && !c.sustained)
      return {
        label: "unclear",
        evidence: { ...base, ...stateEvidence(c), relativeSwing: c.cycle?.relativeSwing ?? null },
        reason: `no steady state found with the signals ${c.name} and no cycle either (the model may grow without bound)`,
      };
    if (c.search.states.every((s) => !s.stable))
      return {
        label: "unclear",
        evidence: {
          ...base,
          ...stateEvidence(c),
          relativeSwing: c.cycle?.relativeSwing ?? null,
          swingRatio: c.cycle?.swingRatio ?? null,
        },
        reason: `no stable steady state with the signals ${c.name}, and integration found no sustained cycle`,
      };
  }
  for (const c of conditions) {
    if (c.search.states.filter((s) => s.stable).length >= 2)
      return { label: "memory", evidence: { ...base, ...stateEvidence(c) } };
  }
  const offC = conditions[0];
  const onC = conditions[1];
  let step: ReturnType<typeof stepResponse> | null = null;
  try {
    step = onC ? stepResponse(meanFieldRhs(model, p, on, false), offC.search.fromInitial, out, settle, sample) : null;
  } catch (e) {
    if (e instanceof OdeBudgetError) throw e;
    return {
      label: "unclear",
      evidence: { turnoverMinutes: tau },
      reason: `the response to the input could not be solved: ${(e as Error).message}`,
    };
  }
  const allEvidence = { ...base, ...stateEvidence(offC), ...(onC ? stateEvidence(onC) : {}) };
  const stepEvidence: Record<string, number> = step
    ? {
        stepStart: step.startLevel,
        stepPeak: step.peakLevel,
        stepPeakMinutes: step.peakMinutes,
        stepFinal: step.finalLevel,
      }
    : {};
  const thr = input.thresholdMolecules;
  if (thr !== undefined) {
    let highest = 0;
    for (const c of conditions)
      for (const s of c.search.states) if (s.stable) highest = Math.max(highest, s.state[out]);
    if (step) highest = Math.max(highest, step.peakLevel);
    if (highest < thr)
      return {
        label: "silent",
        evidence: { ...allEvidence, ...stepEvidence, thresholdMolecules: thr, highestOutput: highest },
      };
  }
  if (
    step &&
    step.peakLevel > step.startLevel &&
    (thr === undefined || step.peakLevel >= thr) &&
    step.finalLevel <= PULSE_FALLBACK_FRACTION * step.peakLevel
  )
    return {
      label: "pulse generator",
      evidence: { ...allEvidence, ...stepEvidence, finalOverPeak: step.finalLevel / step.peakLevel },
    };
  for (const c of conditions) {
    const s = c.search.states.find((x) => x.stable);
    if (s && s.dominantImag > 0 && s.dominantImag / Math.abs(s.dominantReal) >= RINGING_IMAG_OVER_REAL)
      return {
        label: "damped oscillation",
        evidence: {
          ...allEvidence,
          ringingCondition: c.name === "off" ? 0 : 1,
          peakRatio: Math.exp((-2 * Math.PI * Math.abs(s.dominantReal)) / s.dominantImag),
          periodMinutes: (2 * Math.PI) / s.dominantImag,
        },
      };
  }
  // the pass curve (settlePassCurve), else steady
  return {
    pendingPassCurve: true,
    passCurveBase: { ...allEvidence, ...stepEvidence },
    steady: { label: "steady", evidence: { ...allEvidence, ...stepEvidence } },
  };
}

/** A point just off the first unstable steady state (for the cycle check when every start settled on roots). */
function perturbed(search: SteadyStateSearch): Float64Array | null {
  const s = search.states[0];
  if (!s) return null;
  return Float64Array.from(s.state, (v, i) => Math.max(0, v * (1 + 1e-3 * (i + 1)) + 1e-6 * search.scale));
}
