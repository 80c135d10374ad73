/**
 * A budget for one whole ODE computation (a threshold, an estimate, an
 * overlay): a number of integration steps shared by every integrator and every
 * interval of the call, and an optional checkpoint the caller injects to stop
 * on wall time (sim/ has no clock: the server's worker passes
 * `() => Date.now() < deadline`). Exceeding it throws OdeBudgetError, whose
 * message names the fastest reaction and the steps the whole call would need.
 *
 * Example:
 *   const budget = new OdeBudget({ maxSteps: 1e6, checkpoint: () => Date.now() < deadline });
 *   withOdeBudget(budget, () => resolveThreshold(spec));
 */
import { reactionRate, type CompiledModel } from "@/sim/circuit/compile-model";

export interface OdeBudgetOptions {
  /** Integration steps (accepted and rejected) for the whole call. */
  maxSteps: number;
  /** Returns false when the caller's time is up; consulted every CHECK_EVERY steps. */
  checkpoint?: () => boolean;
  /** Wall-time limit in seconds, only for the message. */
  wallSeconds?: number;
}

/** Steps of a call with no budget of its own (the former per-interval cap, now for the whole call). */
export const DEFAULT_ODE_STEPS = 5_000_000;
const CHECK_EVERY = 256;

/** Why an ODE computation gave up; `reason` is stable for callers, `message` is for people. */
export class OdeBudgetError extends Error {
  constructor(
    readonly reason: "steps" | "time" | "nonFinite",
    message: string,
  ) {
    super(message);
    this.name = "OdeBudgetError";
  }
}

/** What the budget knows about the call, to explain a refusal. */
export interface OdeProblemInfo {
  model: CompiledModel;
  p: Float64Array;
  sig: Float64Array;
  /** Start and end of the whole computation (minutes), for the steps-needed estimate. */
  from: number;
  to: number;
  /** What the solve is for and what helps, e.g. "the ON steady state; set threshold.value" (default: the run itself). */
  hint?: string;
}

export class OdeBudget {
  steps = 0;
  readonly maxSteps: number;
  private readonly checkpoint?: () => boolean;
  private readonly wallSeconds?: number;
  /** The problem being integrated (set by the solvers; used only in messages). */
  problem: OdeProblemInfo | null = null;
  /** The first refusal, kept even if a caller catches and rewraps it. */
  failure: OdeBudgetError | null = null;

  constructor(opts: OdeBudgetOptions = { maxSteps: DEFAULT_ODE_STEPS }) {
    this.maxSteps = opts.maxSteps;
    this.checkpoint = opts.checkpoint;
    this.wallSeconds = opts.wallSeconds;
  }

  /** Counts one step at time t (state y); throws when the budget is spent. */
  step(t: number, y: ArrayLike<number>): void {
    this.steps++;
    if (this.steps > this.maxSteps) throw this.exceeded("steps", t, y);
    if (this.checkpoint && this.steps % CHECK_EVERY === 0 && !this.checkpoint()) throw this.exceeded("time", t, y);
  }

  /** The error for a state or derivative that is no longer a finite number. */
  nonFinite(t: number, y: ArrayLike<number>): OdeBudgetError {
    const fast = this.problem ? fastestReaction(this.problem, y) : null;
    return this.fail(
      "nonFinite",
      `the rate equations overflow at t = ${fmt(t)} min` +
        (fast ? ` (reaction "${fast.name}" at ${fmt(fast.perMinute)}/min)` : "") +
        "; lower the rate constants or counts",
    );
  }

  exceeded(reason: "steps" | "time", t: number, y: ArrayLike<number>): OdeBudgetError {
    const info = this.problem;
    const fast = info ? fastestReaction(info, y) : null;
    let needed = NaN;
    if (info && t > info.from && info.to > info.from) needed = (this.steps * (info.to - info.from)) / (t - info.from);
    const limit =
      reason === "steps"
        ? `more than ${this.maxSteps.toLocaleString("en-US")} steps`
        : `more than ${this.wallSeconds ?? "the allowed"} s of computing`;
    const need = Number.isFinite(needed)
      ? ` needs about ${fmtCount(needed)} steps over ${fmt(info!.to - info!.from)} min`
      : ` had reached only t = ${fmt(t)} min`;
    return this.fail(
      reason,
      `stiff or too fast: ` +
        (fast ? `reaction "${fast.name}" at ${fmt(fast.perMinute)}/min` : "the circuit") +
        `${need}${info?.hint ? ` of ${info.hint}` : ""} (${limit}); lower its rate${info?.hint ? "" : " or the end time"}`,
    );
  }

  private fail(reason: OdeBudgetError["reason"], message: string): OdeBudgetError {
    const e = new OdeBudgetError(reason, message);
    this.failure ??= e;
    return e;
  }
}

let ambient: OdeBudget | null = null;

/**
 * Runs fn with `budget` as the budget of every ODE solve inside it that is not
 * given one explicitly (so callers such as the threshold rule need no extra
 * parameter). Synchronous; restores the previous budget afterwards.
 */
export function withOdeBudget<T>(budget: OdeBudget, fn: () => T): T {
  const prev = ambient;
  ambient = budget;
  try {
    return fn();
  } finally {
    ambient = prev;
  }
}

/** The budget for a solve: the given one, the ambient one, or a fresh default. */
export function odeBudget(given?: OdeBudget): OdeBudget {
  return given ?? ambient ?? new OdeBudget();
}

/**
 * The reaction with the largest speed per molecule at state y (per minute):
 * its rate divided by the count of the scarcest species it consumes (or, for
 * a reaction consuming nothing, of the species it makes, at least 1). For a
 * first-order decay this is its rate constant.
 */
export function fastestReaction(
  info: OdeProblemInfo,
  y: ArrayLike<number>,
): { name: string; perMinute: number } | null {
  const { model, p, sig } = info;
  const x = new Float64Array(model.nSpecies);
  for (let i = 0; i < model.nSpecies; i++) x[i] = y[i] > 0 ? y[i] : 0;
  let best: { name: string; perMinute: number } | null = null;
  for (let j = 0; j < model.nReactions; j++) {
    const r = model.reactions[j];
    let speed: number;
    if (r.kind === "massAction" && r.order > 0) {
      // rate constant times the other reactants: the per-molecule speed of the scarcest reactant
      speed = Math.abs(p[r.rateSlot]);
      if (r.order === 2) {
        const [a, b] = r.reactants;
        speed *= r.reactants.length === 1 ? x[a.species] : Math.max(x[a.species], x[b.species]);
      }
      if (r.scaledBy >= 0) speed *= Math.abs(sig[r.scaledBy]);
    } else {
      const a = Math.abs(reactionRate(model, p, x, sig, j, true));
      let count = 1;
      for (const d of r.delta) count = Math.max(count, x[d.species]);
      speed = a / count;
    }
    if (!Number.isFinite(speed)) speed = Number.MAX_VALUE;
    if (!best || speed > best.perMinute) best = { name: r.name, perMinute: speed };
  }
  return best;
}

function fmt(v: number): string {
  if (!Number.isFinite(v)) return String(v);
  if (v !== 0 && (Math.abs(v) >= 1e4 || Math.abs(v) < 1e-3))
    return Number(v.toPrecision(2)).toExponential().replace("e+", "e");
  return String(Number(v.toPrecision(3)));
}

function fmtCount(v: number): string {
  if (v >= 1e6) return Number(v.toPrecision(2)).toExponential().replace("e+", "e");
  return Math.round(v).toLocaleString("en-US");
}
