/**
 * Piscina worker for the request-time computations whose cost depends on the
 * user's input (threshold rule, cost estimate, matched control, acceleration
 * figures): every one runs here, off the HTTP event loop, under one ODE budget
 * for the whole task (steps and wall time, sim/ode/ode-budget.ts). A thin
 * adapter: it calls sim/ and answers { ok, value } or { ok: false, status,
 * code, message } (422 when the budget ran out, 400 for a spec whose threshold
 * cannot be set), never throwing for a user's input.
 */
import type { RunSpec } from "@/shared/schemas/run-spec";
import type { RunSummary } from "@/shared/schemas/analysis";
import { OdeBudget, OdeBudgetError, estimateEvents, resolveThreshold, withOdeBudget } from "@/sim";
import { accelerationFigures, makeMatchedControl } from "@/sim/analysis";
import { runSetup } from "@/sim/engine/run-setup";
import { odeBudget } from "@/sim/ode/ode-budget";
import { classifyDeterministic, type RegimeVerdict } from "@/sim/regimes";
import { THREAD_NAMES, nameThisThread } from "./thread-priority";

nameThisThread(THREAD_NAMES.compute);

export type ComputeJob =
  /** Resolve each spec's threshold (launch checks; a sweep sends all its points). */
  | { kind: "threshold"; specs: RunSpec[] }
  /** Threshold check, then the expected number of reaction firings. */
  | { kind: "estimate"; spec: RunSpec }
  /** The matched simple-regulation control of a run, threshold-checked. */
  | { kind: "control"; spec: RunSpec }
  /** Mean-field behaviour label of each spec (a part of a deterministic regime map). */
  | { kind: "regimeMap"; specs: RunSpec[] }
  | {
      kind: "acceleration";
      circuitSpec: RunSpec;
      circuitSummary: RunSummary;
      controlSpec: RunSpec;
      controlSummary: RunSummary;
    };

export interface ComputeTask {
  job: ComputeJob;
  /** Budget of the whole task. */
  wallMs: number;
  maxSteps: number;
}

export type ComputeAnswer =
  { ok: true; value: unknown } | { ok: false; status: 400 | 422; code: string; message: string; path?: string };

class Refusal extends Error {
  constructor(
    readonly code: string,
    message: string,
    readonly path?: string,
  ) {
    super(message);
  }
}

/**
 * The threshold of a spec, or a Refusal naming the field. With threshold.value
 * given no ODE is solved (a zero-step budget: the rule's optional mean-field
 * warnings are skipped here; the finalised run computes them).
 */
function checkThreshold(spec: RunSpec, point?: number) {
  try {
    if (spec.threshold.value !== undefined)
      return withOdeBudget(new OdeBudget({ maxSteps: 0 }), () => resolveThreshold(spec));
    return resolveThreshold(spec);
  } catch (e) {
    if (e instanceof OdeBudgetError) throw e;
    const where = point === undefined ? "" : `Point ${point}: `;
    throw new Refusal(
      "bad_request",
      `${where}The threshold cannot be set: ${(e as Error).message}`,
      "settings.threshold",
    );
  }
}

function run(job: ComputeJob): unknown {
  switch (job.kind) {
    case "threshold":
      job.specs.forEach((s, i) => checkThreshold(s, job.specs.length > 1 ? i : undefined));
      return null;
    case "estimate":
      checkThreshold(job.spec);
      return estimateEvents(job.spec);
    case "control": {
      let control: RunSpec;
      try {
        control = makeMatchedControl(job.spec);
      } catch (e) {
        if (e instanceof OdeBudgetError) throw e;
        throw new Refusal("bad_request", `A matched control cannot be built for this circuit: ${(e as Error).message}`);
      }
      checkThreshold(control);
      return control;
    }
    case "acceleration":
      return accelerationFigures(job);
    case "regimeMap":
      return job.specs.map(mapVerdict);
  }
}

/**
 * One map point: its mean-field label at its threshold. Where the threshold
 * rule cannot set one (e.g. the output does not rise under the input), the
 * point is classified without it (no `silent` rule); a point that cannot be
 * classified is unclear with the reason. Running out of budget is never a label.
 */
function mapVerdict(spec: RunSpec): RegimeVerdict {
  const spent = (e: unknown) => e instanceof OdeBudgetError || !!odeBudget().failure;
  let theta: number | undefined;
  try {
    const t = resolveThreshold(spec).theta;
    theta = Number.isFinite(t) ? t : undefined;
  } catch (e) {
    if (spent(e)) throw e;
  }
  try {
    return classifyDeterministic({ model: runSetup(spec).model, thresholdMolecules: theta });
  } catch (e) {
    if (spent(e)) throw e;
    return { label: "unclear", evidence: {}, reason: `not classified: ${(e as Error).message}` };
  }
}

export default function compute(task: ComputeTask): ComputeAnswer {
  const deadline = Date.now() + task.wallMs;
  const budget = new OdeBudget({
    maxSteps: task.maxSteps,
    checkpoint: () => Date.now() < deadline,
    wallSeconds: Math.round(task.wallMs / 100) / 10,
  });
  try {
    return { ok: true, value: withOdeBudget(budget, () => run(task.job)) };
  } catch (e) {
    // The budget's own error wins even when a caller wrapped it in a message of its own.
    const spent = budget.failure ?? (e instanceof OdeBudgetError ? e : null);
    if (spent) return { ok: false, status: 422, code: "too_stiff", message: capitalise(spent.message) + "." };
    if (e instanceof Refusal) return { ok: false, status: 400, code: e.code, message: e.message, path: e.path };
    throw e;
  }
}

const capitalise = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);
