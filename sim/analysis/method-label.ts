/**
 * The label of a run's simulation method (docs/metrics.md, "Method"): exact or
 * approximate, the method's name and published source, and for tau-leaping the
 * step control that ran (the constants of sim/engine/tau-leap.ts, so the label
 * cannot drift from the code).
 *
 * @example methodLabel("tauLeap").label // "Approximate: tau-leaping (Cao, Gillespie & Petzold 2006), epsilon 0.03"
 */
import type { MethodLabel } from "@/shared/schemas/analysis";
import type { RunSpec } from "@/shared/schemas/run-spec";
import { TAU_LEAP_STEP_CONTROL } from "@/sim/engine/tau-leap";

export function methodLabel(method: RunSpec["method"]): MethodLabel {
  if (method === "tauLeap") {
    const c = TAU_LEAP_STEP_CONTROL;
    return {
      name: "tauLeap",
      exact: false,
      accuracy: "approximate",
      label: `Approximate: tau-leaping (Cao, Gillespie & Petzold 2006), epsilon ${c.epsilon}`,
      reference: "Cao, Gillespie & Petzold 2006, J Chem Phys 124:044109",
      stepControl: {
        ...c,
        description:
          `Leap length chosen so that no propensity is expected to change by more than epsilon = ${c.epsilon} of itself ` +
          `(and no species' gross consumption exceeds the same bound); reactions with fewer than ${c.criticalFirings} ` +
          `firings left before a reactant runs out are fired one at a time; when a leap would be shorter than ` +
          `${c.shortLeapFactor}/a0, ${c.exactStepsWhenShort} exact direct-method steps are taken instead.`,
      },
    };
  }
  return {
    name: "direct",
    exact: true,
    accuracy: "exact",
    label: "Exact: direct method (Gillespie 1977)",
    reference: "Gillespie 1977, J Phys Chem 81:2340",
    stepControl: null,
  };
}
